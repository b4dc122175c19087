/**
 * Reads a whole VP8 key frame's entropy-coded data without reconstructing a pixel: the frame
 * header and every macroblock's modes from the first partition, every macroblock's DCT tokens
 * from its token partition (macroblock row r uses partition r mod count, RFC 6386 §9.5), and
 * then says where each bool decoder stopped. A generator, so that a caller can give the event
 * loop a turn between macroblock rows.
 */
import { BoolDecoder } from './bool-decoder.js';
import { WebpDamage } from './damage.js';
import { readFrameTag, tokenPartitions } from './vp8-frame.js';
import { readVp8Header } from './vp8-header.js';
import { ModeContexts, readMbModes } from './vp8-modes.js';
import { readMbTokens, TokenContexts } from './vp8-tokens.js';

/** Where one partition's decoder stopped. */
export interface PartitionEnd {
  /** Bytes of the partition it never read. */
  unread: number;
  /** Zero bytes it shifted in past the partition's end. */
  overrun: number;
  /** The next eight bools at p = 1/2 after the last symbol, as a byte (encoders flush with zeros). */
  tail: number;
}

export interface Vp8Parse {
  width: number;
  height: number;
  first: PartitionEnd;
  tokens: PartitionEnd[];
}

function endOf(d: BoolDecoder): PartitionEnd {
  const unread = d.unread;
  const overrun = d.overrun;
  return { unread, overrun, tail: d.literal(8) };
}

export function* parseVp8(chunk: Uint8Array): Generator<void, Vp8Parse> {
  const frame = readFrameTag(chunk);
  const modes = new BoolDecoder(chunk, frame.first[0], frame.first[1]);
  const header = readVp8Header(modes);
  const parts = tokenPartitions(chunk, frame.first[1], header.partitions).map(([s, e]) => new BoolDecoder(chunk, s, e));
  const columns = (frame.width + 15) >> 4;
  const rows = (frame.height + 15) >> 4;
  const modeCtx = new ModeContexts(columns);
  const tokenCtx = new TokenContexts(columns);
  for (let mby = 0; mby < rows; mby++) {
    modeCtx.startRow();
    tokenCtx.startRow();
    const tokens = parts[mby % parts.length];
    for (let mbx = 0; mbx < columns; mbx++) {
      const mb = readMbModes(modes, header, modeCtx, mbx);
      readMbTokens(tokens, header.coeffProbs, mb, tokenCtx, mbx);
    }
    // A decoder far past its end reads only zeros: the data is cut short or out of step.
    if (modes.overrun > 8 || tokens.overrun > 8) throw new WebpDamage(`the VP8 data runs out at macroblock row ${mby} of ${rows}`);
    yield;
  }
  return { width: frame.width, height: frame.height, first: endOf(modes), tokens: parts.map(endOf) };
}

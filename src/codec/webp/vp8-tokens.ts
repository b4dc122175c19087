/**
 * A macroblock's DCT tokens in its token partition (RFC 6386 §13, §19.3 residual_data), read
 * and discarded: only their length in bits matters here. Block types (§13.3): 0 Y after Y2,
 * 1 Y2, 2 chroma, 3 Y with its own DC. A block's "has coefficients" flag, the context of its
 * neighbours below and to the right, is whether its end of block came after its first
 * position, as in the reference decoder (§20.16 tokens.c).
 */
import type { BoolDecoder } from './bool-decoder.js';
import type { MbModes } from './vp8-modes.js';

const coeffBands = [0, 1, 2, 3, 6, 4, 5, 6, 6, 6, 6, 6, 6, 6, 6, 7];
/** Pcat1..Pcat6 of §13.2: the extra bits of each category, most significant first. */
const categoryProbs = [[159], [165, 145], [173, 148, 140], [176, 155, 140, 135], [180, 157, 141, 134, 130], [254, 254, 243, 230, 196, 177, 153, 140, 133, 130, 129]];

/** Where coeff_probs[type][coeff_bands[n]][ctx] starts in the flattened table. */
const at = (type: number, n: number, ctx: number): number => ((type * 8 + coeffBands[n]) * 3 + ctx) * 11;

function skipExtraBits(d: BoolDecoder, category: number): void {
  for (const q of categoryProbs[category]) d.bit(q);
}

/**
 * A token of at least 2 (coeff_tree of §13.2 from its node 6, probabilities p + 3 .. p + 10):
 * DCT_2, DCT_3, DCT_4, or dct_cat1..6 with their extra bits. Its value is not needed.
 */
function skipLargeToken(d: BoolDecoder, probs: Uint8Array, p: number): void {
  if (!d.bit(probs[p + 3])) {
    if (d.bit(probs[p + 4])) d.bit(probs[p + 5]); // DCT_2, or DCT_3 / DCT_4
  } else if (!d.bit(probs[p + 6])) {
    skipExtraBits(d, d.bit(probs[p + 7])); // cat1 / cat2
  } else if (!d.bit(probs[p + 8])) {
    skipExtraBits(d, 2 + d.bit(probs[p + 9])); // cat3 / cat4
  } else {
    skipExtraBits(d, 4 + d.bit(probs[p + 10])); // cat5 / cat6
  }
}

/**
 * One 4x4 block's tokens from position `first` (§13.2, §13.3): the coefficient tree walked
 * node by node. Node 0 is end of block, node 1 DCT_0, after which the next token cannot be
 * an end of block and starts at node 1; node 2 DCT_1. Returns the block's "has coefficients"
 * flag.
 */
function readBlock(d: BoolDecoder, probs: Uint8Array, type: number, first: number, ctx: number): number {
  let n = first;
  let p = at(type, n, ctx);
  while (n < 16) {
    if (!d.bit(probs[p])) return n > first ? 1 : 0; // end of block
    while (!d.bit(probs[p + 1])) {
      // DCT_0: the next position's context is 0
      if (++n === 16) return 1;
      p = at(type, n, 0);
    }
    let next = 1;
    if (d.bit(probs[p + 2])) {
      skipLargeToken(d, probs, p);
      next = 2;
    }
    d.bit(128); // sign
    if (++n < 16) p = at(type, n, next);
  }
  return 1;
}

/** §13.3: per macroblock column above and for the current row to the left, 4 Y, 2 U, 2 V and 1 Y2 flags. */
export class TokenContexts {
  readonly above: Uint8Array;
  readonly left = new Uint8Array(9);
  constructor(mbColumns: number) {
    this.above = new Uint8Array(9 * mbColumns);
  }
  startRow(): void {
    this.left.fill(0);
  }
}

/** Reads macroblock `mbx`'s residual data, as its modes say, and updates the contexts. */
export function readMbTokens(d: BoolDecoder, probs: Uint8Array, modes: MbModes, ctx: TokenContexts, mbx: number): void {
  const above = ctx.above;
  const left = ctx.left;
  const a = 9 * mbx;
  if (modes.skip) {
    // §13.1 as the reference does it: the macroblock's blocks count as empty; the Y2 flags
    // stay those of the last macroblock that had a Y2 block unless this one has one.
    above.fill(0, a, a + 8);
    left.fill(0, 0, 8);
    if (modes.hasY2) above[a + 8] = left[8] = 0;
    return;
  }
  let yType = 3;
  let first = 0;
  if (modes.hasY2) {
    above[a + 8] = left[8] = readBlock(d, probs, 1, 0, above[a + 8] + left[8]);
    yType = 0;
    first = 1;
  }
  for (let y = 0; y < 4; y++) {
    for (let x = 0; x < 4; x++) above[a + x] = left[y] = readBlock(d, probs, yType, first, above[a + x] + left[y]);
  }
  // U then V: 2 x 2 blocks each, their flags at 4..5 (U) and 6..7 (V).
  for (const c of [4, 6]) {
    for (let y = 0; y < 2; y++) {
      for (let x = 0; x < 2; x++) above[a + c + x] = left[c + y] = readBlock(d, probs, 2, 0, above[a + c + x] + left[c + y]);
    }
  }
}

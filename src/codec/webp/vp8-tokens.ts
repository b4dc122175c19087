/**
 * A macroblock's DCT tokens in its token partition (RFC 6386 §13, §19.3 residual_data), read
 * and discarded: only their length in bits matters here. Block types (§13.3): 0 Y after Y2,
 * 1 Y2, 2 chroma, 3 Y with its own DC. A block's "has coefficients" flag, the context of its
 * neighbours below and to the right, is whether its end of block came after its first
 * position, as in the reference decoder (§20.16 tokens.c).
 */
import type { BoolDecoder } from './bool-decoder.js';
import type { MbModes } from './vp8-modes.js';

const EOB = 11;
// DCT_0..DCT_4 are 0..4, dct_cat1..dct_cat6 are 5..10 (§13.2 coeff_tree).
const coeffTree = [-EOB, 2, -0, 4, -1, 6, 8, 12, -2, 10, -3, -4, 14, 16, -5, -6, 18, 20, -7, -8, -9, -10];
const coeffBands = [0, 1, 2, 3, 6, 4, 5, 6, 6, 6, 6, 6, 6, 6, 6, 7];
/** Pcat1..Pcat6 of §13.2: the extra bits of each category, most significant first. */
const categoryProbs = [[159], [165, 145], [173, 148, 140], [176, 155, 140, 135], [180, 157, 141, 134, 130], [254, 254, 243, 230, 196, 177, 153, 140, 133, 130, 129]];

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

function readBlock(d: BoolDecoder, probs: Uint8Array, type: number, first: number, ctx: number): number {
  let n = first;
  let p = ((type * 8 + coeffBands[n]) * 3 + ctx) * 11;
  let afterZero = false;
  while (n < 16) {
    // After a DCT_0 the tree is entered past its end-of-block branch (§13.2).
    const token = d.tree(coeffTree, probs, p, afterZero ? 2 : 0);
    if (token === EOB) break;
    let next = 0;
    if (token > 0) {
      if (token >= 5) for (const q of categoryProbs[token - 5]) d.bit(q);
      d.bit(128); // sign
      next = token === 1 ? 1 : 2;
    }
    afterZero = token === 0;
    if (++n < 16) p = ((type * 8 + coeffBands[n]) * 3 + next) * 11;
  }
  return n > first ? 1 : 0;
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

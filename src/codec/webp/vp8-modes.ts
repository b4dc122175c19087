/**
 * A key frame's macroblock header in the first partition: segment_id, mb_skip_coeff, the luma
 * mode (with sixteen subblock modes for B_PRED) and the chroma mode (RFC 6386 §19.3, §10,
 * §11). The trees and fixed probabilities are those of §10, §11.2 and §11.4; a leaf is the
 * negated value (-0 for value 0, as in the RFC).
 */
import type { BoolDecoder } from './bool-decoder.js';
import type { Vp8Header } from './vp8-header.js';
import { kfBmodeProbs } from './kf-bmode-probs.js';

const B_PRED = 4;
const mbSegmentTree = [2, 4, -0, -1, -2, -3];
// DC_PRED 0, V_PRED 1, H_PRED 2, TM_PRED 3, B_PRED 4
const kfYmodeTree = [-B_PRED, 2, 4, 6, -0, -1, -2, -3];
const kfYmodeProbs = [145, 156, 163, 128];
// B_DC 0, B_TM 1, B_VE 2, B_HE 3, B_LD 4, B_RD 5, B_VR 6, B_VL 7, B_HD 8, B_HU 9
const bmodeTree = [-0, 2, -1, 4, -2, 6, 8, 12, -3, 10, -5, -6, -4, 14, -7, 16, -8, -9];
const uvModeTree = [-0, 2, -1, 4, -2, -3];
const kfUvModeProbs = [142, 114, 183];
/** §11.3 item 4: the subblock mode a 16x16 luma mode stands for as a context (DC, V, H, TM). */
const contextOfYmode = [0, 2, 3, 1];

/** The subblock-mode contexts of §11.3: four per macroblock column above, four to the left. */
export class ModeContexts {
  readonly above: Uint8Array;
  readonly left = new Uint8Array(4);
  constructor(mbColumns: number) {
    this.above = new Uint8Array(4 * mbColumns);
  }
  startRow(): void {
    this.left.fill(0);
  }
}

export interface MbModes {
  skip: boolean;
  /** The macroblock has a Y2 (second order luma DC) block: its luma mode is not B_PRED. */
  hasY2: boolean;
}

export function readMbModes(d: BoolDecoder, h: Vp8Header, ctx: ModeContexts, mbx: number): MbModes {
  if (h.segmentProbs) d.tree(mbSegmentTree, h.segmentProbs);
  const skip = h.skipProb !== null && d.bit(h.skipProb) === 1;
  const ymode = d.tree(kfYmodeTree, kfYmodeProbs);
  const above = ctx.above;
  if (ymode === B_PRED) {
    for (let y = 0; y < 4; y++) {
      for (let x = 0; x < 4; x++) {
        const a = above[4 * mbx + x];
        const mode = d.tree(bmodeTree, kfBmodeProbs, (a * 10 + ctx.left[y]) * 9);
        above[4 * mbx + x] = mode;
        ctx.left[y] = mode;
      }
    }
  } else {
    above.fill(contextOfYmode[ymode], 4 * mbx, 4 * mbx + 4);
    ctx.left.fill(contextOfYmode[ymode]);
  }
  d.tree(uvModeTree, kfUvModeProbs);
  return { skip, hasY2: ymode !== B_PRED };
}

/**
 * The frame header at the start of a key frame's first partition, RFC 6386 §9.2 to §9.11 in
 * the order of §19.2. Only what the rest of the parse needs is kept: the segment map's tree
 * probabilities, the number of token partitions, the token probabilities after this frame's
 * updates (§13.4) and the skip probability.
 */
import type { BoolDecoder } from './bool-decoder.js';
import { coeffUpdateProbs } from './coeff-update-probs.js';
import { defaultCoeffProbs } from './default-coeff-probs.js';

export interface Vp8Header {
  /** mb_segment_tree_probs when update_mb_segmentation_map is set (§9.3), else null. */
  segmentProbs: number[] | null;
  /** 1, 2, 4 or 8 (§9.5). */
  partitions: number;
  /** coeff_probs[4][8][3][11], flattened. */
  coeffProbs: Uint8Array;
  /** prob_skip_false when mb_no_skip_coeff is set (§9.11), else null. */
  skipProb: number | null;
}

export function readVp8Header(d: BoolDecoder): Vp8Header {
  d.literal(2); // color_space, clamping_type (§9.2)
  let segmentProbs: number[] | null = null;
  if (d.bit(128)) {
    // segmentation_enabled (§9.3)
    const updateMap = d.bit(128);
    if (d.bit(128)) {
      // update_segment_feature_data: segment_feature_mode, 4 quantizer and 4 loop filter values
      d.bit(128);
      for (let s = 0; s < 4; s++) d.skipOptionalSigned(7);
      for (let s = 0; s < 4; s++) d.skipOptionalSigned(6);
    }
    if (updateMap) segmentProbs = [0, 1, 2].map(() => (d.bit(128) ? d.literal(8) : 255));
  }
  d.literal(1 + 6 + 3); // filter_type, loop_filter_level, sharpness_level (§9.4)
  if (d.bit(128) && d.bit(128)) {
    // loop_filter_adj_enable, mode_ref_lf_delta_update: 4 reference and 4 mode deltas
    for (let i = 0; i < 8; i++) d.skipOptionalSigned(6);
  }
  const partitions = 1 << d.literal(2); // log2_nbr_of_dct_partitions (§9.5)
  d.literal(7); // y_ac_qi (§9.6), then five optional 4-bit deltas
  for (let i = 0; i < 5; i++) d.skipOptionalSigned(4);
  d.bit(128); // refresh_entropy_probs (§9.7 to §9.11: the only refresh flag of a key frame)
  const coeffProbs = Uint8Array.from(defaultCoeffProbs);
  for (let i = 0; i < coeffProbs.length; i++) {
    if (d.bit(coeffUpdateProbs[i])) coeffProbs[i] = d.literal(8);
  }
  const skipProb = d.bit(128) ? d.literal(8) : null;
  return { segmentProbs, partitions, coeffProbs, skipProb };
}

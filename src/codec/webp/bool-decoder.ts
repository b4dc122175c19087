/**
 * The boolean entropy decoder of RFC 6386 §7.3 (reference: bool_decoder.h, §20.2), over bytes
 * [start, end) of a buffer, which also tells how far it has read. It decodes the same bools
 * as the reference; only its bookkeeping differs: `range` is kept minus one, and `value` holds
 * the 8-bit window plus up to 16 look-ahead bits, read two bytes at a time only when needed
 * (so it reads ahead of need by less than two bytes; libwebp's decoder works so, from memory).
 * Past the end it shifts in zeros, as the reference does, and counts them. A decoder whose
 * symbols match the encoder's stops within a few bytes of its partition's end; one that lost
 * step with the encoder (damaged data) runs out or stops far from it.
 */
export class BoolDecoder {
  private value = 0;
  /** The reference's range minus one, 127..254 between calls. */
  private range = 254;
  /** Look-ahead bits in `value` below the 8-bit window (negative: the window needs bytes). */
  private bits = -8;
  private pos: number;
  /** Zero bytes shifted in after the end of the partition. */
  overrun = 0;

  constructor(
    private readonly data: Uint8Array,
    start: number,
    private readonly end: number,
  ) {
    this.pos = start;
  }

  /** Bytes of the partition not read yet. */
  get unread(): number {
    return this.end - this.pos;
  }

  private load(): void {
    const d = this.data;
    if (this.pos + 2 <= this.end) {
      this.value = (this.value << 16) | (d[this.pos] << 8) | d[this.pos + 1];
      this.pos += 2;
      this.bits += 16;
    } else {
      let byte = 0;
      if (this.pos < this.end) byte = d[this.pos++];
      else this.overrun++;
      this.value = (this.value << 8) | byte;
      this.bits += 8;
    }
  }

  /** One bool whose probability of being 0 is `prob` / 256 (§7.3 bool_get). */
  bit(prob: number): number {
    if (this.bits < 0) this.load();
    const pos = this.bits;
    // §7.3: split = 1 + (((range - 1) * prob) >> 8); here `range` is range - 1 and so is `split`.
    const split = (this.range * prob) >> 8;
    let range: number;
    let bit: number;
    if (this.value >>> pos > split) {
      range = this.range - split - 1;
      this.value -= (split + 1) << pos;
      bit = 1;
    } else {
      range = split;
      bit = 0;
    }
    // Shift until range >= 128, all shifts at once (at most 7).
    const shift = Math.clz32(range + 1) - 24;
    this.range = ((range + 1) << shift) - 1;
    this.bits = pos - shift;
    return bit;
  }

  /** L(n) of §19: an n-bit unsigned literal, most significant bit first, each at p = 1/2. */
  literal(n: number): number {
    let v = 0;
    for (let i = 0; i < n; i++) v = (v << 1) | this.bit(128);
    return v;
  }

  /** A flag, then (when set) an n-bit magnitude and its sign (§9.3, §9.6): the value is not needed. */
  skipOptionalSigned(n: number): void {
    if (this.bit(128)) this.literal(n + 1);
  }

  /**
   * treed_read of §8.1: walks `tree` (pairs of child indices; a leaf is the negated value)
   * from node `at`, the probability of node i being probs[offset + i / 2].
   */
  tree(tree: readonly number[], probs: ArrayLike<number>, offset = 0, at = 0): number {
    let i = at;
    do i = tree[i + this.bit(probs[offset + (i >> 1)])];
    while (i > 0);
    return -i;
  }
}

/**
 * The boolean entropy decoder of RFC 6386 §7.3 (and its reference bool_decoder.h, §20.2), over
 * bytes [start, end) of a buffer, which also tells how far it has read: past the end it shifts
 * in zeros, as the reference does, and counts them. A decoder whose symbols match the
 * encoder's stops within a few bytes of its partition's end; one that lost step with the
 * encoder (damaged data) runs out or stops far from it.
 */
export class BoolDecoder {
  private value: number;
  private range = 255;
  private bitCount = 0;
  private pos: number;
  /** Zero bytes shifted in after the end of the partition. */
  overrun = 0;

  constructor(
    private readonly data: Uint8Array,
    start: number,
    private readonly end: number,
  ) {
    this.pos = start;
    // §20.2 init_bool_decoder: the first two bytes make up the 16-bit value.
    this.value = (this.next() << 8) | this.next();
  }

  /** Bytes of the partition not read yet. */
  get unread(): number {
    return this.end - this.pos;
  }

  private next(): number {
    if (this.pos < this.end) return this.data[this.pos++];
    this.overrun++;
    return 0;
  }

  /** One bool whose probability of being 0 is `prob` / 256 (§7.3 bool_get). */
  bit(prob: number): number {
    const split = 1 + (((this.range - 1) * prob) >> 8);
    const bigSplit = split << 8;
    let bit: number;
    if (this.value >= bigSplit) {
      bit = 1;
      this.range -= split;
      this.value -= bigSplit;
    } else {
      bit = 0;
      this.range = split;
    }
    // The reference shifts one bit at a time until range >= 128, taking in a byte after every
    // 8 shifts; this shifts them all at once (at most 7, so at most one byte comes in) and
    // places the byte where the remaining shifts would have moved it.
    const shift = Math.clz32(this.range) - 24;
    if (shift > 0) {
      this.range <<= shift;
      this.value <<= shift;
      this.bitCount += shift;
      if (this.bitCount >= 8) {
        this.bitCount -= 8;
        this.value |= this.next() << this.bitCount;
      }
    }
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

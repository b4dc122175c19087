/** What a WebP bitstream check found wrong: the message says where (src/codec/webp/check.ts). */
export class WebpDamage extends Error {
  override name = 'WebpDamage';
}

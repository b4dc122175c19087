/**
 * Damaged copies of good image files, the kinds of damage seen in the field: bytes flipped in
 * the middle third, a scan cut short, and a JPEG frame header that claims more pixels than its
 * data holds. The pictures are analytic (crossed gratings), so any decode of them is checkable.
 */
import sharp from 'sharp';

/** Crossed gratings and a ramp, 8-bit RGB, width x height. */
export function gratingRaw(width: number, height: number): Buffer {
  const raw = Buffer.alloc(width * height * 3);
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      for (let c = 0; c < 3; c++) {
        const v = 0.5 + 0.3 * Math.sin(2 * Math.PI * (0.013 * x + 0.007 * y + c / 4)) + 0.15 * Math.cos(2 * Math.PI * 0.021 * y);
        raw[(y * width + x) * 3 + c] = Math.round(255 * Math.min(1, Math.max(0, v)));
      }
    }
  }
  return raw;
}

export function encodeGrating(format: 'jpeg' | 'webp' | 'tiff' | 'png', width = 1200, height = 900): Promise<Buffer> {
  return sharp(gratingRaw(width, height), { raw: { width, height, channels: 3 } })[format]().toBuffer();
}

/** A copy with every 97th byte of the middle third inverted (XOR 0xff). */
export function flipMiddleThird(bytes: Buffer): Buffer {
  const copy = Buffer.from(bytes);
  for (let i = Math.floor(copy.length / 3); i < Math.floor((2 * copy.length) / 3); i += 97) copy[i] ^= 0xff;
  return copy;
}

/** The first `share` of the bytes. */
export function truncated(bytes: Buffer, share: number): Buffer {
  return Buffer.from(bytes.subarray(0, Math.floor(bytes.length * share)));
}

/**
 * A JPEG whose baseline frame header (SOF0, ITU-T T.81 §B.2.2: marker FFC0, length, precision,
 * then Y and X as 16-bit big-endian numbers) claims width x height over its own data.
 */
export function withFrameSize(jpeg: Buffer, width: number, height: number): Buffer {
  const copy = Buffer.from(jpeg);
  for (let i = 2; i + 9 < copy.length; i++) {
    if (copy[i] === 0xff && copy[i + 1] === 0xc0) {
      copy.writeUInt16BE(height, i + 5);
      copy.writeUInt16BE(width, i + 7);
      return copy;
    }
  }
  throw new Error('no SOF0 marker in this JPEG');
}

/**
 * A twill-like weave in two yarn colours, 8-bit RGB (the picture of load:hostile's damaged
 * files): lossy WebP of it at quality 90 with every 64th byte of the middle third inverted is
 * decoded by libwebp without any error, unlike the gratings above.
 */
export function weaveRaw(width: number, height: number): Buffer {
  const out = Buffer.alloc(width * height * 3);
  for (let y = 0, o = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const t = (Math.floor(x / 3 + Math.abs((y % 16) - 8)) & 1) === 1;
      out[o++] = t ? 190 : 60;
      out[o++] = t ? 170 : 80;
      out[o++] = t ? 120 : 110;
    }
  }
  return out;
}

/** The weave as a lossy WebP with every 64th byte of its middle third inverted (XOR 0xff). */
export async function silentlyDamagedWebp(width = 1200, height = 900): Promise<Buffer> {
  const webp = await sharp(weaveRaw(width, height), { raw: { width, height, channels: 3 } }).webp({ quality: 90 }).toBuffer();
  const copy = Buffer.from(webp);
  for (let i = Math.floor(copy.length / 3); i < Math.floor((2 * copy.length) / 3); i += 64) copy[i] ^= 0xff;
  return copy;
}

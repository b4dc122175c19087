import { describe, expect, it } from 'vitest';
import { decodeEntry, encodeEntry } from '../../src/cache/entry-codec.js';
import { packValue, unpackValue } from '../../src/cache/pack.js';
import type { CacheEntry } from '../../src/cache/types.js';
import { analyzeSpectrum, type SourceSpectrum } from '../../src/core/spectrum/index.js';

describe('packValue / unpackValue', () => {
  it('round-trips numbers, strings, nesting and every typed-array kind bit for bit', () => {
    const value = {
      n: 3.25,
      s: 'herringbone',
      nested: { list: [1, 'two', null, true] },
      f64: new Float64Array([Math.PI, -0, 1e-300]),
      f32: new Float32Array([0.1, 2.5]),
      u8: new Uint8Array([0, 255, 7]), // odd length: the next segment must still line up
      i16: new Int16Array([-32768, 32767]),
      u32: new Uint32Array([4294967295]),
      i32: new Int32Array([-5]),
      u16: new Uint16Array([65535, 1]),
      i8: new Int8Array([-128]),
      clamped: new Uint8ClampedArray([9]),
      buf: Buffer.from([0xff, 0x00, 0x0d, 0x0a]),
    };
    const back = unpackValue<typeof value>(packValue(value));
    expect(back).toEqual(value);
    expect(back.f64).toBeInstanceOf(Float64Array);
    expect(Object.is(back.f64[1], -0)).toBe(true);
    expect(Buffer.isBuffer(back.buf)).toBe(true);
    expect(back.i16).toBeInstanceOf(Int16Array);
  });

  it('keeps non-finite numbers that JSON alone would turn into null', () => {
    const back = unpackValue<number[]>(packValue([NaN, Infinity, -Infinity, 0]));
    expect(back[0]).toBeNaN();
    expect(back.slice(1)).toEqual([Infinity, -Infinity, 0]);
  });

  it('packs a view into a larger buffer as just the view', () => {
    const big = new Float32Array([1, 2, 3, 4, 5]);
    const back = unpackValue<{ v: Float32Array }>(packValue({ v: big.subarray(1, 3) }));
    expect(Array.from(back.v)).toEqual([2, 3]);
  });

  it('refuses foreign and truncated bytes, and reserved keys', () => {
    expect(() => unpackValue(Buffer.from('hello world'))).toThrow(TypeError);
    const packed = packValue({ a: new Float64Array(4) });
    expect(() => unpackValue(packed.subarray(0, packed.length - 8))).toThrow(TypeError);
    expect(() => packValue({ $fwbin: 1 })).toThrow(TypeError);
  });
});

describe('a real SourceSpectrum analysis', () => {
  it('round-trips bit for bit (what the alias-risk cache stores in any tier)', () => {
    // A horizontal grating of 0.3 cycles per pixel, grey, 8 bit: an analytic input.
    const width = 96, height = 80;
    const data = new Uint8Array(width * height);
    for (let y = 0; y < height; y++) {
      for (let x = 0; x < width; x++) data[y * width + x] = Math.round(127.5 + 100 * Math.cos(2 * Math.PI * 0.3 * x));
    }
    const spectrum = analyzeSpectrum({ data, width, height, channels: 1 });
    expect(spectrum.power.length).toBeGreaterThan(0);
    const back = unpackValue<SourceSpectrum>(packValue(spectrum));
    expect(back).toEqual(spectrum);
    expect(back.power).toBeInstanceOf(Float32Array);
    expect(back.grid.power).toBeInstanceOf(Float32Array);
  });
});

describe('encodeEntry / decodeEntry', () => {
  const entry: CacheEntry = {
    body: Buffer.from([0xff, 0xd8, 0x00, 0x0a, 0x0d, 0xff, 0xd9]),
    contentType: 'image/jpeg',
    etag: '"fw1-abc"',
    headers: { 'Rendition-Plan': 'scale=4;kernel=lanczos-3' },
    createdAt: 1_700_000_000_000,
  };

  it('round-trips a rendition with binary bytes intact', () => {
    const back = decodeEntry(encodeEntry(entry));
    expect(back).toEqual(entry);
    expect(back?.body.equals(entry.body)).toBe(true);
  });

  it('reads anything else as a miss, not an error', () => {
    expect(decodeEntry(Buffer.from('not an entry'))).toBeUndefined();
    expect(decodeEntry(packValue({ v: 1, body: 'text' }))).toBeUndefined();
    expect(decodeEntry(packValue({ ...entry, v: 99 }))).toBeUndefined();
  });

  it('reads an entry of version 1 (no length, no hash) as a miss', () => {
    expect(decodeEntry(packValue({ ...entry, v: 1 }))).toBeUndefined();
  });

  it('reads an entry whose body was cut short or altered as a miss (length and SHA-256 checked)', () => {
    const bytes = encodeEntry({ ...entry, body: Buffer.alloc(64, 7) });
    expect(decodeEntry(bytes)?.body.length).toBe(64);
    const altered = Buffer.from(bytes);
    altered[altered.length - 1 - 8] ^= 0x01; // a byte of the body (binary segments end the buffer, padded to 8)
    expect(decodeEntry(altered)).toBeUndefined();
    expect(decodeEntry(bytes.subarray(0, bytes.length - 16))).toBeUndefined();
  });
});

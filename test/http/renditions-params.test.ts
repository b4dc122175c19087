import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { build, type TestApp } from '../helpers/build.js';
import { at, pixels, writePng } from '../helpers/images.js';

describe('GET /v1/renditions: format, quality, background, kernel, prefilter, light, depth, alpha', () => {
  let t: TestApp;
  const get = (name: string, q: string, headers: Record<string, string> = {}) =>
    t.app.inject({ url: `/v1/renditions/${name}?${q}`, headers });

  beforeAll(async () => {
    t = await build();
    // 1-px black/white columns: the classic test of resampling in linear light.
    await writePng(t.sourceDir, 'stripes.png', 64, 16, 1, (x) => [x % 2 ? 255 : 0]);
    // A circular zone plate (Schuler 2014): broadband detail, so encoder quality shows in bytes.
    await writePng(t.sourceDir, 'zone.png', 128, 128, 3, (x, y) => {
      const r2 = (x - 64) ** 2 + (y - 64) ** 2;
      const v = Math.round(255 * (0.5 + 0.5 * Math.cos((Math.PI * r2) / 128)));
      return [v, v, v];
    });
    // Opaque red on the left, fully transparent black on the right.
    await writePng(t.sourceDir, 'edge.png', 64, 16, 4, (x) => (x < 32 ? [255, 0, 0, 255] : [0, 0, 0, 0]));
    // 16-bit grey ramp, one 16-bit code per column: 8-bit output could not keep these steps.
    const ramp = new Uint16Array(256 * 4);
    for (let y = 0; y < 4; y++) for (let x = 0; x < 256; x++) ramp[y * 256 + x] = 30000 + x;
    await sharp(ramp, { raw: { width: 256, height: 4, channels: 1 } })
      .toColourspace('grey16')
      .png()
      .toFile(`${t.sourceDir}/ramp16.png`);
  });
  afterAll(() => t.close());

  it.each([
    ['jpeg', 'image/jpeg'],
    ['png', 'image/png'],
    ['webp', 'image/webp'],
    ['avif', 'image/avif'],
  ])('format=%s gives %s, without Vary', async (format, type) => {
    const res = await get('zone.png', `width=32&format=${format}`);
    expect(res.statusCode).toBe(200);
    expect(res.headers['content-type']).toBe(type);
    expect(res.headers.vary).toBeUndefined();
    const meta = await sharp(res.rawPayload).metadata();
    expect(meta.format === 'heif' ? 'avif' : meta.format).toBe(format);
    expect([meta.width, meta.height]).toEqual([32, 32]);
  });

  it('quality changes the bytes (lower quality, smaller JPEG)', async () => {
    const low = await get('zone.png', 'width=100&format=jpeg&quality=10');
    const high = await get('zone.png', 'width=100&format=jpeg&quality=95');
    expect(low.rawPayload.length).toBeLessThan(high.rawPayload.length);
  });

  it('light=linear halves 1-px black/white stripes to 188; light=encoded to 128', async () => {
    // IEC 61966-2-1: linear 0.5 encodes to 187.5 -> 188 (+-1 for rounding); averaging the
    // encoded codes gives 127.5 -> 128 (CHECKS.md, colour).
    const linear = await pixels((await get('stripes.png', 'width=32&format=png')).rawPayload);
    const encoded = await pixels((await get('stripes.png', 'width=32&format=png&light=encoded')).rawPayload);
    expect([linear.width, linear.height]).toEqual([32, 8]);
    for (const x of [4, 16, 27]) {
      expect(Math.abs(at(linear, x, 4)[0] - 188)).toBeLessThanOrEqual(1);
      expect(Math.abs(at(encoded, x, 4)[0] - 128)).toBeLessThanOrEqual(1);
    }
  });

  it('kernel and prefilter are honoured and reported in Rendition-Plan', async () => {
    const box = await get('zone.png', 'width=32&format=png&kernel=box&prefilter=none');
    expect(box.headers['rendition-plan']).toMatch(/kernel=box/);
    expect(box.headers['rendition-plan']).toMatch(/sigma=0\.00,0\.00/);
    const blurred = await get('zone.png', 'width=32&format=png&kernel=box&prefilter=2');
    expect(blurred.headers['rendition-plan']).toMatch(/sigma=2\.00,2\.00/);
    expect(blurred.rawPayload.equals(box.rawPayload)).toBe(false);
    const nearest = await get('zone.png', 'width=32&format=png&kernel=nearest-neighbour');
    expect(nearest.headers['rendition-plan']).toMatch(/kernel=nearest-neighbour/);
    expect(nearest.headers['rendition-plan']).toMatch(/light=linear/);
    const enc = await get('zone.png', 'width=32&format=png&light=encoded');
    expect(enc.headers['rendition-plan']).toMatch(/light=encoded/);
  });

  it('keeps 16-bit input at 16-bit precision into a 16-bit PNG', async () => {
    const res = await get('ramp16.png', 'width=128&format=png&light=encoded&kernel=box&prefilter=none');
    // Read back at 16 bits: sharp's default pipeline would hand out 8-bit sRGB.
    const { data, info } = await sharp(res.rawPayload)
      .pipelineColourspace('grey16')
      .toColourspace('grey16')
      .raw({ depth: 'ushort' })
      .toBuffer({ resolveWithObject: true });
    expect((await sharp(res.rawPayload).metadata()).depth).toBe('ushort');
    const row = new Uint16Array(data.buffer, data.byteOffset, info.width * info.channels);
    // A box average of codes 30000+2o and 30001+2o: 30000.5 + 2o, so 16-bit steps of 2 survive
    // (an 8-bit path would move in steps of 257). Interior columns only (edges clamp).
    for (const o of [10, 50, 100]) expect(Math.abs(row[o * info.channels] - (30000.5 + 2 * o))).toBeLessThanOrEqual(1);
  });

  it('keeps alpha in PNG and does not darken transparent edges (premultiplied)', async () => {
    // Premultiplied-alpha resampling (Porter & Duff 1984, "Compositing digital images", from
    // memory): a half-covered edge pixel keeps the colour of the opaque side, not a dark mix.
    const img = await pixels((await get('edge.png', 'width=16&format=png')).rawPayload);
    expect(img.channels).toBe(4);
    expect([img.width, img.height]).toEqual([16, 4]);
    expect(at(img, 2, 2)).toEqual([255, 0, 0, 255]);
    expect(at(img, 13, 2)[3]).toBe(0);
    const partial = [6, 7, 8, 9].map((x) => at(img, x, 2)).filter((p) => p[3] > 0 && p[3] < 255);
    expect(partial.length).toBeGreaterThan(0);
    for (const p of partial) expect(p[0]).toBeGreaterThanOrEqual(253);
  });

  it('flattens alpha onto the background for JPEG', async () => {
    const img = await pixels((await get('edge.png', 'width=16&format=jpeg&background=0000ff&quality=100')).rawPayload);
    expect(img.channels).toBe(3);
    const right = at(img, 14, 2);
    expect(right[2]).toBeGreaterThan(240); // transparent side shows the blue background
    expect(right[0]).toBeLessThan(15);
    expect(at(img, 1, 2)[0]).toBeGreaterThan(240);
  });

  it.each([
    ['kernel=lanczos2', 'kernel "lanczos2" is now spelled "lanczos-2"'],
    ['kernel=lanczos3', 'kernel "lanczos3" is now spelled "lanczos-3"'],
    ['kernel=mitchell', 'kernel "mitchell" is now spelled "mitchell-netravali"'],
    ['kernel=nearest', 'kernel "nearest" is now spelled "nearest-neighbour"'],
    ['format=auto', 'format "auto" is no longer a value: leave format out and it is negotiated on Accept'],
  ])('the old spelling %s answers 400 naming the new one', async (q, detail) => {
    const res = await get('zone.png', `width=32&${q}`);
    expect(res.statusCode).toBe(400);
    expect(res.json()).toMatchObject({ code: 'ERR_PARAM_INVALID', detail });
  });

  it('fit defaults to contain: a 2:1 picture in a square box keeps all of itself, with bars', async () => {
    const plain = await get('edge.png', 'width=16&height=16&format=png');
    const contain = await get('edge.png', 'width=16&height=16&format=png&fit=contain');
    const img = await pixels(plain.rawPayload);
    expect([img.width, img.height]).toEqual([16, 16]);
    expect(at(img, 1, 0)).toEqual([255, 255, 255, 0]); // bar above: transparent background in PNG
    expect(at(img, 1, 8)).toEqual([255, 0, 0, 255]); // the red half is all there
    expect(plain.headers.etag).toBe(contain.headers.etag);
    const cover = await pixels((await get('edge.png', 'width=16&height=16&format=png&fit=cover')).rawPayload);
    expect(at(cover, 1, 0)).toEqual([255, 0, 0, 255]); // cover crops instead: no bar
  });
});

import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { build, type TestApp } from '../helpers/build.js';
import { pixels } from '../helpers/images.js';
import { gratingCode, png, rampCode, upload } from './fixtures.js';

let t: TestApp;
beforeAll(async () => {
  t = await build();
});
afterAll(() => t.close());

const W = 480;
const H = 320;
const F = 0.45; // cycles per source pixel
const ladder = '?formats=png&widths=240,360,420,480';

/** |DFT| of the middle row's grey level at `cycles` per output pixel (Fourier, direct sum). */
function rowAmplitude(img: { data: Buffer; width: number; height: number; channels: number }, cycles: number): number {
  const y = img.height >> 1;
  let re = 0;
  let im = 0;
  for (let x = 0; x < img.width; x++) {
    const v = img.data[(y * img.width + x) * img.channels];
    re += v * Math.cos(2 * Math.PI * cycles * x);
    im -= v * Math.sin(2 * Math.PI * cycles * x);
  }
  return Math.hypot(re, im) / img.width;
}

describe('ingest warnings', () => {
  // Sampling theorem (Shannon 1949): 0.45 cycles/px survives a shrink by s only while
  // 0.45 < 0.5 / s, i.e. s < 1.11; at 420 px (s = 1.14) it folds to |s f - round(s f)|
  // cycles per output pixel (CHECKS.md), a coarse false band.
  it("with prefilter=none, warn at 420 px in the model's words, with advice that works on pixels", async () => {
    const res = await upload(t.app, await png(W, H, gratingCode(F)), `${ladder}&prefilter=none`);
    expect(res.statusCode).toBe(200);
    const m = res.json();
    expect(m.renditions.find((r: any) => r.width === 420).risk.level).toBe('high');
    const risky = m.renditions.filter((r: any) => r.risk.level !== 'low' && r.format === 'png').map((r: any) => r.width);
    expect(m.warnings.map((w: string) => Number(/^at (\d+) px /.exec(w)?.[1]))).toEqual(risky);
    const at420 = m.warnings.find((w: string) => w.startsWith('at 420 px'));
    expect(at420).toMatch(/^at 420 px most of the image will show a pattern that folds into coarse bands [\d.]+ px apart \(plainly visible\); prefilter=auto removes the false bands/);
    expect(at420).toMatch(/they show cleanly from \d+ px wide$/);
    const url = m.renditions.find((r: any) => r.width === 420 && r.format === 'png').url;
    expect(url).toContain('prefilter=none');
    const s = W / 420;
    const alias = Math.abs(s * F - Math.round(s * F));
    const get = async (u: string) => pixels((await t.app.inject({ method: 'GET', url: u })).rawPayload);
    const asked = rowAmplitude(await get(url), alias);
    const remedied = rowAmplitude(await get(url.replace('prefilter=none', 'prefilter=auto')), alias);
    expect(remedied).toBeLessThan(asked / 10);
  });

  it('with the defaults, prefilter=auto leaves no fold at 420 px to warn about', async () => {
    const m = (await upload(t.app, await png(W, H, gratingCode(F)), ladder)).json();
    expect(m.renditions.find((r: any) => r.width === 420).risk.level).toBe('low');
    expect(m.warnings.some((w: string) => w.startsWith('at 420 px'))).toBe(false);
  });

  it("refuses a bad rendition parameter with the rendition route's code", async () => {
    const res = await upload(t.app, await png(W, H, gratingCode(F)), `${ladder}&kernel=sharpest`);
    expect(res.statusCode).toBe(400);
  });

  it('name the region where the pattern is', async () => {
    const grating = gratingCode(F);
    const lowerRight = (x: number, y: number) => (x >= (2 * W) / 3 && y >= (2 * H) / 3 ? grating(x, y) : [128, 128, 128]);
    const m = (await upload(t.app, await png(W, H, lowerRight), `${ladder}&prefilter=none`)).json();
    const at420 = m.warnings.find((w: string) => w.startsWith('at 420 px'));
    expect(at420).toMatch(/^at 420 px the lower-right region will show a pattern that folds/);
  });

  it('stay silent for a smooth gradient', async () => {
    const m = (await upload(t.app, await png(W, H, rampCode(W)), ladder)).json();
    expect(m.renditions.every((r: any) => r.risk.level === 'low')).toBe(true);
    expect(m.warnings).toEqual([]);
  });
});

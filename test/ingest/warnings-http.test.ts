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
  it('warn, in plain words, at the widths where a fine grating folds, and name a remedy that works', async () => {
    const res = await upload(t.app, await png(W, H, gratingCode(F)), ladder);
    const m = res.json();
    const risky = m.renditions.filter((r: any) => r.risk.level !== 'low').map((r: any) => r.width);
    // Sampling theorem (Shannon 1949): 0.45 cycles/px survives a shrink by s only while
    // 0.45 < 0.5 / s, i.e. s < 1.11; 420 px (s = 1.14) must fold, 240 px is filtered flat.
    expect(risky).toContain(420);
    expect(m.renditions.find((r: any) => r.width === 420).risk.level).toBe('high');
    expect(m.warnings.map((w: string) => Number(/^at (\d+) px /.exec(w)?.[1]))).toEqual(risky);
    const at420 = m.warnings.find((w: string) => w.startsWith('at 420 px'));
    expect(at420).toMatch(/^at 420 px most of the image will show moiré \(fine periodic pattern\); 480 px or prefilter=(\d+\.\d) avoids it$/);

    // The remedy, checked on pixels: the folded component lands at |s f - round(s f)| cycles
    // per output pixel (CHECKS.md, sampling and aliasing); the suggested prefilter must cut it.
    const sigma = /prefilter=(\d+\.\d)/.exec(at420)![1];
    const s = W / 420;
    const alias = Math.abs(s * F - Math.round(s * F));
    const url = m.renditions.find((r: any) => r.width === 420 && r.format === 'png').url;
    const get = async (extra: string) => pixels((await t.app.inject({ method: 'GET', url: url + extra })).rawPayload);
    const planned = rowAmplitude(await get(''), alias);
    const remedied = rowAmplitude(await get(`&prefilter=${sigma}`), alias);
    const naive = rowAmplitude(await get('&prefilter=none&kernel=nearest'), alias);
    expect(naive).toBeGreaterThan(planned);
    expect(remedied).toBeLessThan(planned / 2);
  });

  it('name the region where the pattern is', async () => {
    const grating = gratingCode(F);
    const lowerRight = (x: number, y: number) => (x >= (2 * W) / 3 && y >= (2 * H) / 3 ? grating(x, y) : [128, 128, 128]);
    const m = (await upload(t.app, await png(W, H, lowerRight), ladder)).json();
    const at420 = m.warnings.find((w: string) => w.startsWith('at 420 px'));
    expect(at420).toMatch(/^at 420 px the lower-right region will show moiré/);
  });

  it('stay silent for a smooth gradient', async () => {
    const m = (await upload(t.app, await png(W, H, rampCode(W)), ladder)).json();
    expect(m.renditions.every((r: any) => r.risk.level === 'low')).toBe(true);
    expect(m.warnings).toEqual([]);
  });
});

/**
 * The visibility model's targets on the demo shop's pictures and on natural photographs
 * (issue 12; printed by `npm run risk-calibration`). The photographs are Debian's
 * python3-skimage set (CHECKS.md, "Open data"); that part skips, saying so, where absent.
 */
import { existsSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { bandEnergy, demoRows, photoSource, PHOTOS, planFor, render, SKIMAGE_DATA } from '../../../scripts/risk/cases.js';

describe('demo pictures at 160..1280 px', () => {
  const rows = demoRows();
  it('rates at least 90 % of the default renditions low, and the legacy look worse on at least 80 %', () => {
    expect(rows.length).toBe(42);
    const low = rows.filter((r) => r.ours.level === 'low').length;
    const worse = rows.filter((r) => r.legacy.margin > r.ours.margin).length;
    expect(low / rows.length).toBeGreaterThanOrEqual(0.9);
    expect(worse / rows.length).toBeGreaterThanOrEqual(0.8);
  });

  it('sees the pinstripes beat at 320 px in the legacy look, plainly', () => {
    const r = rows.find((x) => x.path === 'fabrics/pinstripe.png' && x.width === 320)!;
    const top = r.legacy.patterns[0];
    expect(top.kind).toBe('beat');
    expect(r.legacy.level).toBe('high');
    // 13.2 px stripes at scale 6.25: 0.473 cycles per output px, beat period 1/(1 - 2u) ~ 19 px.
    expect(1 / Math.abs(top.apparent.fx)).toBeGreaterThan(15);
    expect(1 / Math.abs(top.apparent.fx)).toBeLessThan(25);
    expect(r.ours.cutoff.x).toBeLessThan(1);
  });
});

const present = existsSync(SKIMAGE_DATA);
if (!present) console.warn(`skipping natural photographs: ${SKIMAGE_DATA} is absent (install Debian's python3-skimage)`);

describe.skipIf(!present)('natural photographs (python3-skimage)', () => {
  it('prefilter=auto keeps at least 95 % of the band energy 0.5x..0.9x Nyquist against prefilter=none', async () => {
    for (const name of PHOTOS.slice(0, 4)) {
      const src = (await photoSource(name))!;
      for (const width of [160, 320]) {
        const auto = bandEnergy(render(src, planFor(src, width, 'default')), 0.5, 0.9);
        const none = bandEnergy(render(src, planFor(src, width, { prefilter: 'none' })), 0.5, 0.9);
        expect(auto / none).toBeGreaterThanOrEqual(0.95);
      }
    }
  });
});

import { writeFile } from 'node:fs/promises';
import { join } from 'node:path';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makePlan, planResponse } from '../../src/core/index.js';
import { analyzeSpectrum, assessRisk } from '../../src/core/risk/index.js';
import { build, type TestApp } from '../helpers/build.js';
import { grating, greyRaster, type Pattern } from '../core/risk/patterns.js';

/** Writes an analytic pattern (linear light, sRGB-encoded 8-bit grey) as a PNG source. */
async function writePattern(dir: string, name: string, w: number, h: number, p: Pattern): Promise<Buffer> {
  const r = greyRaster(w, h, p, 8);
  const png = await sharp(Buffer.from(r.data.buffer), { raw: { width: w, height: h, channels: 1 } }).png().toBuffer();
  await writeFile(join(dir, name), png);
  return png;
}

async function pixels(png: Buffer) {
  const { data, info } = await sharp(png).raw().toBuffer({ resolveWithObject: true });
  return { at: (x: number, y: number) => [...data.subarray((y * info.width + x) * info.channels, (y * info.width + x) * info.channels + 3)], info };
}

describe('GET /v1/alias-risk/{source}', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await build();
    await writePattern(t.sourceDir, 'grating.png', 512, 512, grating(0.3));
    await writePattern(t.sourceDir, 'near.png', 512, 512, grating(0.275));
    await writePattern(t.sourceDir, 'corner.png', 1024, 512, (x, y) => (x < 256 && y < 256 ? grating(0.3, 0.4)(x, y) : 0.5));
  });
  afterAll(async () => t.close());

  const get = (url: string, headers: Record<string, string> = {}) => t.app.inject({ method: 'GET', url, headers });

  it('reports a naive decimation of a 0.3 cycles/px grating by 2 as high, aliasing to 0.4', async () => {
    const res = await get('/v1/alias-risk/grating.png?width=256&prefilter=none&kernel=nearest-neighbour');
    expect(res.statusCode).toBe(200);
    expect(res.headers['content-type']).toMatch(/^application\/json/);
    const body = res.json();
    expect(body.source).toEqual({ path: 'grating.png', width: 512, height: 512 });
    expect(body.target).toEqual({ width: 256, height: 256 });
    expect(body.scale).toEqual({ x: 2, y: 2 });
    // New Nyquist 0.5 / s; 0.3 by 2 -> |0.6 - 1| = 0.4 (sampling theorem, CHECKS.md).
    expect(body.nyquist).toEqual({ x: 0.25, y: 0.25 });
    expect(body.level).toBe('high');
    expect(body.peaks[0].kind).toBe('periodic');
    expect(body.peaks[0].aliasTo.fx).toBeCloseTo(0.4, 2);
    expect(body.folded.unfiltered).toBeGreaterThan(0.9);
    expect(body.plan.header).toBe(res.headers['rendition-plan']);
    expect(body.grid.cells).toHaveLength(body.grid.columns * body.grid.rows);
    expect(res.headers['server-timing']).toMatch(/analyze;dur=/);
  });

  it('answers what the core computes for the same plan', async () => {
    const res = await get('/v1/alias-risk/grating.png?width=200');
    const { data, info } = await sharp(join(t.sourceDir, 'grating.png')).raw().toBuffer({ resolveWithObject: true });
    const spec = analyzeSpectrum({ data: new Uint8Array(data), width: info.width, height: info.height, channels: info.channels as 1 | 3 });
    const plan = makePlan({ sourceWidth: 512, sourceHeight: 512, targetWidth: 200, targetHeight: 200, kernel: 'auto', prefilter: 'auto', light: 'linear' });
    const core = assessRisk(spec, plan, (a, f) => planResponse(plan, a, f));
    expect(res.json().score).toBeCloseTo(core.score, 12);
    expect(res.json().folded.planned).toBeCloseTo(core.folded.planned, 12);
  });

  // 0.275 cycles/px at s = 2 is 0.55 cycles per output px, 1.1x the new Nyquist: it folds.
  it('lowers the cut-off for prefilter=auto on a source with a visible fold, in the report and in the rendition', async () => {
    const report = (await get('/v1/alias-risk/near.png?width=256')).json();
    expect(report.plan.adaptiveCutoff.x).toBeLessThan(1);
    expect(report.plan.adaptiveCutoff.y).toBe(1);
    expect(report.plan.reason).toMatch(/cut-off lowered by content/);
    expect(report.level).toBe('low');
    const cx = report.plan.adaptiveCutoff.x.toFixed(2);
    const rendition = await get('/v1/renditions/near.png?width=256&format=png');
    expect(rendition.statusCode).toBe(200);
    expect(rendition.headers['rendition-plan']).toContain(`cutoff=${cx},1.00`);
    const fixed = await get('/v1/renditions/near.png?width=256&format=png&prefilter=none');
    expect(fixed.headers['rendition-plan']).toContain('cutoff=1.00,1.00');
    const none = (await get('/v1/alias-risk/near.png?width=256&prefilter=none')).json();
    expect(none.level).toBe('high');
    expect(none.patterns[0].kind).toBe('fold');
    expect(none.patterns[0].margin).toBeGreaterThan(3);
    expect(none.advice[0].change).toBe('prefilter=auto');
    expect(none.advice[0].cost).toMatch(/show cleanly from \d+ px wide/);
    expect(none.viewing.degreesPerPixel).toBeCloseTo(0.02131, 4);
  });

  it('documents the per-pattern fields in the OpenAPI document', async () => {
    const doc = (await get('/docs/openapi.json')).json();
    const schema = doc.paths['/v1/alias-risk/{source}'].get.responses['200'].content['application/json'].schema;
    const pattern = schema.properties.patterns.items.properties;
    const names = ['kind', 'frequency', 'apparent', 'cyclesPerDegree', 'contrast', 'threshold', 'margin', 'description'];
    expect(Object.keys(pattern)).toEqual(expect.arrayContaining(names));
    expect(pattern.kind.enum).toEqual(['fold', 'beat', 'clean']);
    expect(schema.properties.viewing.description).toMatch(/0\.0213 degrees/);
  });

  it('analyses a source once for many widths and views', async () => {
    await get('/v1/alias-risk/corner.png?width=100');
    const before = t.app.spectra.analyses;
    for (const w of [120, 320, 640]) expect((await get(`/v1/alias-risk/corner.png?width=${w}`)).statusCode).toBe(200);
    expect((await get('/v1/alias-risk/corner.png?width=320&view=spectrum')).statusCode).toBe(200);
    expect(t.app.spectra.analyses).toBe(before);
  });

  it('draws the spectrum with the new Nyquist frequency where it belongs', async () => {
    const res = await get('/v1/alias-risk/grating.png?width=256&view=spectrum');
    expect(res.statusCode).toBe(200);
    expect(res.headers['content-type']).toBe('image/png');
    const { at, info } = await pixels(res.rawPayload);
    // The 512 px plot sits 64 px from the left (frequency labels) and 30 px from the top, with
    // 120 px on the right for the colour bar: 64 + 512 + 120.
    expect(info.width).toBe(696);
    // 128-cell spectrum shown 4x: fx = 0.25 lies at (64 + 0.25 * 128 + 0.5) * 4 = 386 in the plot.
    expect(at(64 + 386, 30 + 256)).toEqual([255, 255, 255]);
    expect(at(64 + 130, 30 + 256)).toEqual([255, 255, 255]); // fx = -0.25: (64 - 32 + 0.5) * 4
  });

  it('maps the risk where the pattern is', async () => {
    const res = await get('/v1/alias-risk/corner.png?width=256&view=map&prefilter=none&kernel=nearest-neighbour');
    expect(res.statusCode).toBe(200);
    const { at, info } = await pixels(res.rawPayload);
    expect(info.width).toBe(640);
    expect(info.height).toBe(320 + 96); // the map, then its legend in threshold units
    const [r1, g1, b1] = at(40, 40); // top-left region: the grating, tinted by its margin
    const [r2, g2, b2] = at(600, 280); // bottom-right: flat, below a quarter of threshold: grey
    expect(r1 - b1).toBeGreaterThan(30); // the madder ramp runs from ochre to dark red
    expect(r1).toBeGreaterThan(g1);
    expect(Math.max(Math.abs(r2 - g2), Math.abs(g2 - b2))).toBeLessThanOrEqual(2);
  });

  it('answers 304 to its own ETag', async () => {
    const first = await get('/v1/alias-risk/grating.png?width=128');
    const again = await get('/v1/alias-risk/grating.png?width=128', { 'if-none-match': String(first.headers.etag) });
    expect(again.statusCode).toBe(304);
  });

  it.each([
    ['/v1/alias-risk/grating.png?width=100&view=picture', 400, 'ERR_PARAM_INVALID'],
    ['/v1/alias-risk/grating.png?width=100&colour=red', 400, 'ERR_PARAM_UNKNOWN'],
    ['/v1/alias-risk/grating.png?view=map', 400, 'ERR_PARAM_MISSING'],
    ['/v1/alias-risk/grating.png?width=100&view=map&view=json', 400, 'ERR_PARAM_REPEATED'],
    ['/v1/alias-risk/missing.png?width=100', 404, 'ERR_SOURCE_NOT_FOUND'],
    ['/v1/alias-risk/fabrics%2f..%2fsecret.png?width=100', 400, 'ERR_SOURCE_PATH_INVALID'],
  ])('refuses %s with %i %s as problem details', async (url, status, code) => {
    const res = await get(url);
    expect(res.statusCode).toBe(status);
    expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
    expect(res.json().code).toBe(code);
  });
});

/**
 * What a rendition job is admitted for (src/rendition/admit.ts): a streamed render with
 * prefilter=auto counts the analysis that may run beside it (the rows its Welch tiles copy out
 * of the spool file, src/pool/cost.ts: analysisCost); nothing else changes.
 */
import sharp from 'sharp';
import { beforeAll, describe, expect, it } from 'vitest';
import { loadConfig } from '../../src/config.js';
import { kernelNames } from '../../src/core/index.js';
import { readHeader } from '../../src/codec/header.js';
import { analysisCost } from '../../src/pool/cost.js';
import type { RenderPool } from '../../src/pool/render-pool.js';
import { type AdmitContext, admitRendition } from '../../src/rendition/admit.js';
import type { AdaptivePrefilter } from '../../src/rendition/prefilter.js';
import { StageClock } from '../../src/rendition/timings.js';
import { compileRenditionQuery } from '../../src/schemas/rendition.js';

const limits = loadConfig({}).limits;
const query = compileRenditionQuery({ maxDimension: limits.maxDimension, kernelNames });
const identity = { key: 'k', version: 'v' };

/** The bytes each admission asked the pool for (spooling on or off). */
function context(spooling: boolean, adaptive?: AdaptivePrefilter): { ctx: AdmitContext; asked: number[] } {
  const asked: number[] = [];
  const pool = {
    spool: spooling ? {} : null,
    admit: (bytes: number) => {
      asked.push(bytes);
      return Promise.resolve({ bytes, release() {} });
    },
  } as unknown as RenderPool;
  return { ctx: { pool, limits, clock: new StageClock(), ...(adaptive ? { adaptive } : {}) }, asked };
}

const adaptive: AdaptivePrefilter = { known: async () => null, analyse: async () => undefined };

describe('admitRendition', () => {
  let bytes: Buffer;
  beforeAll(async () => {
    bytes = await sharp({ create: { width: 1600, height: 1200, channels: 3, background: '#8a5' } }).jpeg().toBuffer();
  });

  it('a streamed prefilter=auto render counts its analysis\'s reader; prefilter=none, or no analysis at hand, does not', async () => {
    const h = await readHeader(bytes, { maxPixels: limits.maxPixels, maxDimension: limits.maxDimension });
    // 1600 x 1200 RGB: the reader's block, 218 rows of 4800 bytes (1 MiB), and one 128 x 128 tile.
    expect(analysisCost(h)).toBe(218 * 1600 * 3 + 128 * 128 * 3);
    const source = { identity, bytes };
    const on = context(true, adaptive);
    await admitRendition(on.ctx, source, query.parse({ width: '400' }), undefined);
    await admitRendition(on.ctx, source, query.parse({ width: '400', prefilter: 'none' }), undefined);
    expect(on.asked[0] - on.asked[1]).toBe(analysisCost(h));
    const without = context(true);
    await admitRendition(without.ctx, source, query.parse({ width: '400' }), undefined);
    expect(without.asked[0]).toBe(on.asked[1]);
    // Decoded in memory, the analysis reads the staged copy already counted.
    const memory = context(false, adaptive);
    await admitRendition(memory.ctx, source, query.parse({ width: '400' }), undefined);
    await admitRendition(memory.ctx, source, query.parse({ width: '400', prefilter: 'none' }), undefined);
    expect(memory.asked[0]).toBe(memory.asked[1]);
  });
});

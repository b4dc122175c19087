import { describe, expect, it } from 'vitest';
import { loadConfig } from '../../src/config.js';
import { queuePerThread, RenderPool, runningPerThread } from '../../src/pool/render-pool.js';

describe('RenderPool admission bound (jobs running + waiting)', () => {
  it('defaults to a short line: two waiting renders per worker thread (config/default.json says null)', async () => {
    expect(loadConfig({}).pool.maxQueue).toBeNull();
    expect(queuePerThread).toBe(2);
    // Two jobs per thread hold memory at once: one resampling while another decodes or encodes.
    expect(runningPerThread).toBe(2);
    const pool = new RenderPool({ threads: 2, maxQueue: null, retryAfterSeconds: 1 });
    try {
      expect(pool.bound).toBe(2 * 2 + 2 * 2);
    } finally {
      await pool.close();
    }
  });

  it('an explicit maxQueue (0 included) is taken as given', async () => {
    for (const maxQueue of [0, 5]) {
      const pool = new RenderPool({ threads: 1, maxQueue, retryAfterSeconds: 1 });
      try {
        expect(pool.bound).toBe(2 + maxQueue);
      } finally {
        await pool.close();
      }
    }
  });
});

import { symlink } from 'node:fs/promises';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makePlan } from '../../src/core/index.js';
import { SpoolWriteError } from '../../src/codec/spool-decode.js';
import { RenderPool } from '../../src/pool/render-pool.js';

const shape = { width: 64, height: 48, channels: 3 as const, depth: 8 as const };
const plan = makePlan({ sourceWidth: 64, sourceHeight: 48, targetWidth: 32, targetHeight: 24, kernel: 'auto', prefilter: 'auto', light: 'linear' });

describe('RenderPool.resampleSpooled when the spool file cannot be read back', () => {
  let pool: RenderPool;
  beforeAll(() => {
    pool = new RenderPool({ threads: 1, maxQueue: 0, retryAfterSeconds: 1, spoolDir: 'auto' });
  });
  afterAll(() => pool.close());

  // Opening it fails with ELOOP, standing for the reader's own failures (EMFILE, EIO, ...) while
  // the writer is still at work: nothing is wrong with the source, so this is the signal to
  // decode in memory (streamed.ts), not a failed render (ERR_RENDER_FAILED, 500).
  it('rejects with SpoolWriteError, so the render decodes in memory instead', async () => {
    const path = pool.spool!.path();
    await symlink(path, path);
    try {
      const writing = new Promise<void>(() => undefined);
      const failure = await pool.resampleSpooled(path, shape, writing, plan).catch((e: unknown) => e);
      expect(failure).toBeInstanceOf(SpoolWriteError);
      // The worker's typed outcome (worker.ts: BandOutcome), not a message the pool matched.
      expect((failure as Error).cause).toMatchObject({ name: 'SpoolReadError', fault: 'unreadable', message: expect.stringMatching(/^ELOOP/) });
    } finally {
      await pool.spool!.remove(path);
    }
    // The pool renders on afterwards.
    const src = { data: new Uint8Array(64 * 48 * 3).fill(128), width: 64, height: 48, channels: 3 as const };
    expect((await pool.resample(src, plan)).data.every((v) => v === 128)).toBe(true);
  });
});

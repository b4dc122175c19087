/**
 * Shutdown drains accepted async ingest jobs (Prefer: respond-async, 202): a job accepted just
 * before SIGTERM's shutdown path finishes before close resolves; one that cannot finish within
 * the deadline is marked failed with a stable code, not dropped. Synchronised on events (the
 * gated origin's 'read', the job table's 'settled'), never on sleeps.
 */
import { once } from 'node:events';
import { mkdtemp, readdir, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, describe, expect, it } from 'vitest';
import { createFolderOrigin } from '../../src/origins/folder.js';
import { installShutdown } from '../../src/shutdown.js';
import { build, type TestApp } from '../helpers/build.js';
import { gatedOrigin } from '../helpers/gated-origin.js';
import { png, rampCode, upload } from './fixtures.js';

const opened: Array<{ t: TestApp; dir: string; release: () => void }> = [];
afterEach(async () => {
  for (const { t, dir, release } of opened.splice(0)) {
    release();
    await t.close();
    await rm(dir, { recursive: true, force: true });
  }
});

/** An app whose origin holds reads until released, with one async upload accepted (202). */
async function acceptedJob(deadlineMs: number) {
  const dir = await mkdtemp(join(tmpdir(), 'fw-ingest-shutdown-'));
  const gated = gatedOrigin(createFolderOrigin(dir));
  const t = await build({ sourceDir: dir, origin: gated.origin, config: { shutdown: { deadlineMs } } });
  opened.push({ t, dir, release: gated.release });
  const reading = once(gated.events, 'read');
  const res = await upload(t.app, await png(48, 32, rampCode(48)), '?widths=24&formats=png', { prefer: 'respond-async' });
  expect(res.statusCode).toBe(202);
  await reading; // the job is running: the upload is stored, and the job reads it back from the origin
  const handle = installShutdown(t.app, { deadlineMs, signals: [], exit: () => undefined });
  return { t, dir, gated, id: res.json().id as string, handle };
}

describe('shutdown with async ingest jobs', () => {
  it('finishes a job accepted just before shutdown before close resolves', async () => {
    const { t, dir, gated, id, handle } = await acceptedJob(30_000);
    const closing = handle.shutdown('test');
    // The read comes through only after the shutdown has begun: without the drain the pool
    // would close under the job, and close would resolve with the job unfinished or failed.
    gated.release();
    expect(await closing).toBe(0);
    const job = t.app.ingest.jobs.get(id);
    expect(job?.state).toBe('done');
    expect(t.app.ingest.jobs.accepting).toBe(false);
    expect(job?.result?.renditions.map((r) => [r.width, r.format])).toEqual([[24, 'png']]);
    // The upload is stored in the origin under the content-addressed key the manifest names.
    const stored = (await readdir(dir, { recursive: true })).map((f) => f.split('\\').join('/'));
    expect(stored).toContain(job?.result?.source.key);
  });

  it('marks a job that cannot finish within the deadline failed with ERR_INGEST_ABANDONED', async () => {
    const { t, id, handle } = await acceptedJob(300);
    const settled = t.app.ingest.jobs.settled(id);
    void handle.shutdown('test');
    const job = await settled;
    expect(job?.state).toBe('failed');
    expect(job?.error?.code).toBe('ERR_INGEST_ABANDONED');
  });
});

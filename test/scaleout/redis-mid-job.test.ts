/**
 * Redis going down while a queued ingest job runs (issue 13): the job, held at its origin read
 * so that it is truly mid-job, loses Redis; its work ends while Redis is away; Redis comes back
 * on the same port. With an append-only file (what a job queue's Redis runs with) the job is
 * stored as done once Redis returns; with a Redis that comes back empty the job is gone (a poll
 * answers 404), the replica serves on and the same upload sent again answers the manifest at
 * once from the work already done. Every rendition the manifest names is then fetched and checked.
 * Tests wait on the origin's `read`, the queue's `idle` and `settled` events, never on time.
 */
import { once } from 'node:events';
import { mkdir, mkdtemp, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { IngestQueue } from '../../src/ingest/queue.js';
import { build, type TestApp } from '../helpers/build.js';
import { redisBinary, startRedis, type RedisProcess } from '../helpers/redis-server.js';
import { png, rampCode } from '../ingest/fixtures.js';
import { GatedOrigin } from './replicas.js';

type Node = TestApp & { origin: GatedOrigin; queue: IngestQueue; outcomes: Map<string, string> };

async function node(dir: string, redisUrl: string): Promise<Node> {
  await mkdir(dir, { recursive: true });
  const origin = new GatedOrigin(dir);
  const t = await build({
    sourceDir: dir,
    origin,
    config: {
      cache: { redisUrl },
      // The breaker opens after two failures, so the renders during the outage skip Redis at once.
      redis: { namespace: 'mid-job:', failureThreshold: 2, breakerOpenMs: 300 },
      ingest: { jobLockMs: 2000 },
      shutdown: { deadlineMs: 1500 },
    },
  });
  const outcomes = new Map<string, string>();
  const queue = t.app.ingestQueue!;
  queue.on('settled', (id: string, state: string) => outcomes.set(id, state));
  return Object.assign(t, { origin, queue, outcomes });
}

/** Resolves with job `id`'s end state on this replica (at once if it has ended already). */
function settled(n: Node, id: string): Promise<string> {
  return new Promise((resolve) => {
    const seen = n.outcomes.get(id);
    if (seen) return resolve(seen);
    n.queue.on('settled', (done: string, state: string) => done === id && resolve(state));
  });
}

const post = (n: Node, payload: Buffer, async = true) =>
  n.app.inject({
    method: 'POST',
    url: '/v1/ingest?widths=64,128&formats=webp,png',
    headers: { 'content-type': 'image/png', ...(async ? { prefer: 'respond-async' } : {}) },
    payload,
  });

/** Holds the job at its origin read, kills Redis, lets the work end while Redis is away. */
async function workWhileRedisIsAway(n: Node, server: RedisProcess, bytes: Buffer | { source: string }): Promise<string> {
  n.origin.close();
  const reading = once(n.origin, 'read');
  const accepted = Buffer.isBuffer(bytes)
    ? await post(n, bytes)
    : await n.app.inject({ method: 'POST', url: '/v1/ingest?widths=64', headers: { prefer: 'respond-async', 'content-type': 'application/json' }, payload: bytes });
  expect(accepted.statusCode).toBe(202);
  const { id } = accepted.json();
  await reading; // the job runs on this replica, held before its source is read
  expect((await n.app.inject(`/v1/ingest/jobs/${id}`)).json().state).toBe('running');
  await server.kill();
  const idle = once(n.queue, 'idle');
  n.origin.open();
  await idle; // the work is over; BullMQ has not been able to record it
  const poll = await n.app.inject(`/v1/ingest/jobs/${id}`);
  expect(poll.statusCode).toBe(503);
  expect(poll.json().code).toBe('ERR_INGEST_QUEUE_DOWN');
  expect(poll.headers['retry-after']).toBe('2');
  return id;
}

/** Every rendition the manifest names is served, with its width, format and ETag. */
async function checkRenditions(n: Node, manifest: any): Promise<void> {
  // 64 and 128 px of a 160 x 100 source, in the order asked (format, then width).
  expect(manifest.renditions.map((r: any) => [r.format, r.width, r.height])).toEqual([
    ['webp', 64, 40], ['webp', 128, 80], ['png', 64, 40], ['png', 128, 80],
  ]);
  for (const r of manifest.renditions) {
    const res = await n.app.inject({ url: r.url, headers: { accept: `image/${r.format}` } });
    expect(res.statusCode).toBe(200);
    expect(res.headers.etag).toBe(r.etag);
    expect(res.rawPayload.length).toBe(r.bytes);
    const meta = await sharp(res.rawPayload).metadata(); // sharp reads the bytes as a reference
    expect([meta.format, meta.width, meta.height]).toEqual([r.format, r.width, r.height]);
  }
}

describe.skipIf(!redisBinary)('Redis going down mid-job', () => {
  let dir: string;
  beforeAll(async () => {
    dir = await mkdtemp(join(tmpdir(), 'fw-mid-job-'));
  });
  afterAll(async () => {
    if (dir) await rm(dir, { recursive: true, force: true });
  });

  it('with an append-only Redis, the job whose work ended while Redis was away is done when it returns', async () => {
    const server = await startRedis({ persistDir: dir });
    const n = await node(join(dir, 'sources-aof'), server.url);
    try {
      const bytes = await png(160, 100, rampCode(160));
      const id = await workWhileRedisIsAway(n, server, bytes);
      const done = settled(n, id);
      // Back on the same port, its data read from the append-only file. The lock may have
      // lapsed while Redis was away (no renewal reached it): BullMQ then refuses the
      // completion and its stalled-job check runs the job again, which finds its work done.
      await server.restart();
      expect(await done).toBe('done');
      const job = await n.app.inject(`/v1/ingest/jobs/${id}`);
      expect(job.statusCode).toBe(200);
      expect(job.json()).toMatchObject({ id, state: 'done' });
      await checkRenditions(n, job.json().manifest);
      // The same manifest as a synchronous upload of the same bytes, now all cache hits.
      const sync = await post(n, bytes, false);
      expect(sync.statusCode).toBe(200);
      expect(job.json().manifest).toEqual(sync.json());
    } finally {
      await n.close();
      await server.stop();
    }
  });

  it('with an append-only Redis, a job whose work failed for good while Redis was away is failed, with its code, when it returns', async () => {
    await mkdir(join(dir, 'aof-failed'));
    const server = await startRedis({ persistDir: join(dir, 'aof-failed') });
    const sources = join(dir, 'sources-failed');
    const n = await node(sources, server.url);
    try {
      // A PNG cut after its header: the decode refuses it (a 4xx, not retried).
      await writeFile(join(sources, 'torn.png'), (await png(64, 64, rampCode(64))).subarray(0, 60));
      const id = await workWhileRedisIsAway(n, server, { source: 'torn.png' });
      const ended = settled(n, id);
      await server.restart();
      expect(await ended).toBe('failed');
      const job = await n.app.inject(`/v1/ingest/jobs/${id}`);
      expect(job.statusCode).toBe(200);
      expect(job.json()).toMatchObject({ id, state: 'failed', error: { code: expect.stringMatching(/^ERR_SOURCE_/) } });
      expect((await n.app.inject('/healthz')).statusCode).toBe(200);
    } finally {
      await n.close();
      await server.stop();
    }
  });

  it('with a Redis that comes back empty, the job is gone (404), the replica serves on and the upload sent again answers the manifest', async () => {
    const server = await startRedis();
    const n = await node(join(dir, 'sources-empty'), server.url);
    try {
      const bytes = await png(160, 100, rampCode(160));
      const id = await workWhileRedisIsAway(n, server, bytes);
      await server.restart(); // same port, empty
      await n.queue.ready();
      const gone = await n.app.inject(`/v1/ingest/jobs/${id}`);
      expect(gone.statusCode).toBe(404);
      expect(gone.json().code).toBe('ERR_INGEST_JOB_NOT_FOUND');
      // Sent again: this replica finished the work, so the answer is the manifest at once.
      const again = await post(n, bytes);
      expect(again.statusCode).toBe(200);
      await checkRenditions(n, again.json());
      expect((await n.app.inject('/healthz')).statusCode).toBe(200);
    } finally {
      await n.close();
      await server.stop();
    }
  });
});

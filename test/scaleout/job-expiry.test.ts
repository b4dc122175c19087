/**
 * Queued jobs' results expire after ingest.jobResultSeconds (issue 13), exactly: BullMQ removes
 * old finished jobs only when another job finishes, so the queue checks the age itself. The
 * queue runs on a real redis-server with a clock the test moves; the work is a stand-in (the
 * queue's bookkeeping is the subject, not the renders).
 */
import { Redis } from 'ioredis';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Manifest } from '../../src/ingest/manifest.js';
import { IngestQueue, type QueuedWork } from '../../src/ingest/queue.js';
import { redisBinary, startRedis, type RedisProcess } from '../helpers/redis-server.js';

describe.skipIf(!redisBinary)('queued job results expire after jobResultSeconds', () => {
  let server: RedisProcess;
  let redis: Redis;
  let queue: IngestQueue;
  let ahead = 0;
  let runs = 0;

  beforeAll(async () => {
    server = await startRedis();
    redis = new Redis(server.url);
    queue = new IngestQueue(
      { url: server.url, prefix: 'expiry:q', maxJobs: 8, resultSeconds: 60, lockMs: 5000, concurrency: 1, attempts: 1, timeoutMs: 5000, now: () => Date.now() + ahead },
      async (work: QueuedWork) => ({ source: { key: work.source }, run: ++runs }) as unknown as Manifest,
      () => ({ code: 'ERR_INTERNAL', detail: 'Internal error', status: 500 }),
    );
    queue.on('settled', (id: string, state: string) => ends.push(`${id} ${state}`));
    await queue.ready();
  });
  afterAll(async () => {
    await queue?.close(1000);
    redis?.disconnect();
    await server?.stop();
  });

  /** The `n`th end of job `id` (counting from the start: a job may end before its submit returns). */
  const ends: string[] = [];
  const settled = (id: string, n: number) =>
    new Promise<string>((resolve) => {
      const check = () => {
        const mine = ends.filter((e) => e.startsWith(`${id} `));
        if (mine.length >= n) resolve(mine[n - 1].split(' ')[1]);
      };
      queue.on('settled', check);
      check();
    });
  const work: QueuedWork = { key: 'twill-ladder', source: 'uploads/twill.png', options: { widths: [64] } };

  it('is polled until then, is gone (404 and removed from Redis) after, and the same work makes a new job', async () => {
    const first = (await queue.submit(work))!;
    expect(await settled(first.id, 1)).toBe('done');
    expect(await queue.get(first.id)).toMatchObject({ id: first.id, state: 'done', result: { run: 1 } });

    ahead = 30_000; // half of the 60 s
    expect((await queue.get(first.id))?.state).toBe('done');
    expect(await redis.exists(`expiry:q:ingest:${first.id}`)).toBe(1);

    ahead = 60_000;
    expect(await queue.get(first.id)).toBeUndefined();
    expect(await redis.exists(`expiry:q:ingest:${first.id}`)).toBe(0);

    // Sent again later: a new job of the same id, run again.
    ahead = 0;
    const again = (await queue.submit(work))!;
    expect(again.id).toBe(first.id);
    expect(await settled(first.id, 2)).toBe('done');
    expect(await queue.get(first.id)).toMatchObject({ state: 'done', result: { run: 2 } });
  });

  it('a finished job past its time is not handed back as the answer to the same work', async () => {
    const other: QueuedWork = { ...work, key: 'stripes-ladder' };
    const first = (await queue.submit(other))!;
    expect(await settled(first.id, 1)).toBe('done');
    const before = runs;
    ahead = 61_000;
    await queue.submit(other); // the expired job is removed and a new one queued, not the old answer
    ahead = 0;
    expect(await settled(first.id, 2)).toBe('done');
    expect(runs).toBe(before + 1);
    expect((await queue.get(first.id))?.result).toMatchObject({ run: before + 1 });
  });
});

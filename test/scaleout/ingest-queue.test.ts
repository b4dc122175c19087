/**
 * Async ingest jobs on the shared BullMQ queue, with a real redis-server and two or more
 * replicas built in this process that share one source folder (standing in for a shared store)
 * and one Redis. Tests wait on the queues' `settled` events and the origins' `read` events.
 */
import { createHmac } from 'node:crypto';
import { once } from 'node:events';
import { createServer } from 'node:http';
import type { AddressInfo } from 'node:net';
import { mkdtemp, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { IngestQueue } from '../../src/ingest/queue.js';
import { build, type TestApp } from '../helpers/build.js';
import { redisBinary, startRedis, type RedisProcess } from '../helpers/redis-server.js';
import { png, rampCode, gratingCode } from '../ingest/fixtures.js';
import { GatedOrigin } from './replicas.js';

type Node = TestApp & { origin: GatedOrigin; queue: IngestQueue };

const key = 'a signing key for the weaving shop';
let server: RedisProcess;
let dir: string;

async function node(config: Record<string, unknown> = {}): Promise<Node> {
  const origin = new GatedOrigin(dir);
  const t = await build({
    sourceDir: dir,
    origin,
    config: {
      cache: { redisUrl: server.url },
      redis: { namespace: 'ingest-queue:' },
      ingest: { jobLockMs: 1000 },
      shutdown: { deadlineMs: 1500 },
      ...config,
    },
  });
  return Object.assign(t, { origin, queue: t.app.ingestQueue! });
}

/** Resolves with the job's state when any of `nodes` finishes job `id`. */
function settled(id: string, ...nodes: Node[]): Promise<string> {
  return new Promise((resolve) => {
    for (const n of nodes) n.queue.on('settled', (done: string, state: string) => done === id && resolve(state));
  });
}

function post(n: Node, payload: Buffer, query = '?widths=64,128') {
  return n.app.inject({ method: 'POST', url: `/v1/ingest${query}`, headers: { 'content-type': 'image/png', prefer: 'respond-async' }, payload });
}

describe.skipIf(!redisBinary)('ingest jobs on the shared queue', () => {
  beforeAll(async () => {
    server = await startRedis();
    dir = await mkdtemp(join(tmpdir(), 'fw-queue-'));
  });
  afterAll(async () => {
    await server?.stop();
    if (dir) await rm(dir, { recursive: true, force: true });
  });

  describe('two replicas', () => {
    let a: Node;
    let b: Node;
    beforeAll(async () => {
      [a, b] = [await node(), await node()];
    });
    afterAll(async () => Promise.all([a?.close(), b?.close()]));

    it('a job accepted by one replica is polled on the other and ends with the manifest a synchronous upload gives', async () => {
      const bytes = await png(160, 100, rampCode(160));
      const accepted = await post(a, bytes);
      expect(accepted.statusCode).toBe(202);
      const { id } = accepted.json();
      expect(accepted.headers.location).toBe(`/v1/ingest/jobs/${id}`);
      const done = settled(id, a, b);
      const early = await b.app.inject(`/v1/ingest/jobs/${id}`);
      expect(early.statusCode).toBe(200);
      expect(['queued', 'running', 'done']).toContain(early.json().state);
      expect(await done).toBe('done');
      const polled = await b.app.inject(`/v1/ingest/jobs/${id}`);
      expect(polled.json()).toMatchObject({ id, state: 'done' });
      const sync = await b.app.inject({ method: 'POST', url: '/v1/ingest?widths=64,128', headers: { 'content-type': 'image/png' }, payload: bytes });
      expect(polled.json().manifest).toEqual(sync.json());
      expect(polled.json().manifest.renditions).toHaveLength(4);
    });

    it('the same upload sent to both replicas is one job (idempotent by content digest)', async () => {
      a.origin.close();
      b.origin.close();
      const bytes = await png(150, 90, rampCode(150));
      const [ra, rb] = [await post(a, bytes), await post(b, bytes)];
      expect([ra.statusCode, rb.statusCode]).toEqual([202, 202]);
      expect(rb.json().id).toBe(ra.json().id);
      const done = settled(ra.json().id, a, b);
      a.origin.open();
      b.origin.open();
      expect(await done).toBe('done');
    });

    it('a picture that cannot be decoded fails once, for good, with its code, on both replicas', async () => {
      await writeFile(join(dir, 'torn.png'), Buffer.concat([(await png(64, 64, rampCode(64))).subarray(0, 60)]));
      const accepted = await a.app.inject({
        method: 'POST', url: '/v1/ingest', headers: { prefer: 'respond-async', 'content-type': 'application/json' }, payload: { source: 'torn.png' },
      });
      expect(accepted.statusCode).toBe(202);
      const { id } = accepted.json();
      const done = settled(id, a, b);
      expect(await done).toBe('failed');
      for (const n of [a, b]) {
        const job = (await n.app.inject(`/v1/ingest/jobs/${id}`)).json();
        expect(job.state).toBe('failed');
        expect(job.error.code).toMatch(/^ERR_SOURCE_/);
      }
    });
  });

  it('a stopping replica hands its running job back and another one finishes it; a full queue answers 503', async () => {
    const c = await node({ ingest: { jobLockMs: 1000, maxJobs: 1 } });
    c.origin.close();
    const reading = once(c.origin, 'read');
    const accepted = await post(c, await png(140, 80, gratingCode(0.3)));
    expect(accepted.statusCode).toBe(202);
    const { id } = accepted.json();
    await reading; // C runs the job, held at its origin
    const full = await post(c, await png(130, 80, rampCode(130)));
    expect(full.statusCode).toBe(503);
    expect(full.json().code).toBe('ERR_INGEST_JOBS_FULL');
    expect(full.headers['retry-after']).toBe('2');
    await c.close(); // the shutdown deadline passes with the job held: it goes back to the queue
    const d = await node();
    try {
      const done = settled(id, d);
      expect(await done).toBe('done');
      const job = (await d.app.inject(`/v1/ingest/jobs/${id}`)).json();
      expect(job.manifest.renditions.map((r: any) => r.width)).toEqual([64, 128, 64, 128]);
    } finally {
      await d.close();
    }
  });

  it('a queued job with a callback: the outcome is POSTed, signed, through the shared callback queue after a failed attempt', async () => {
    const received: Array<{ body: string; signature: string; time: string; polled: string }> = [];
    const statuses = [503, 200];
    let g: Node | undefined;
    const target = createServer((req, res) => {
      const chunks: Buffer[] = [];
      req.on('data', (c: Buffer) => chunks.push(c)).on('end', async () => {
        // What a receiver that polls on receipt sees: the callback comes once the end is recorded.
        const polled = (await g!.app.inject(`/v1/ingest/jobs/${JSON.parse(Buffer.concat(chunks).toString()).job}`)).json().state;
        received.push({ body: Buffer.concat(chunks).toString(), signature: String(req.headers['foldwise-callback-signature']), time: String(req.headers['foldwise-callback-time']), polled });
        res.writeHead(statuses.shift() ?? 200).end();
      });
    });
    target.listen(0, '127.0.0.1');
    await once(target, 'listening');
    const url = `http://127.0.0.1:${(target.address() as AddressInfo).port}`;
    g = await node({
      signing: { keys: [key], required: false },
      origin: { upstream: { allowHosts: [url], allowPrivate: true } },
      ingest: { jobLockMs: 1000, callbackBaseDelayMs: 50 },
    });
    try {
      const delivered = once(g.app.callbacks, 'delivered');
      const accepted = await g.app.inject({
        method: 'POST', url: `/v1/ingest?widths=64&callback=${encodeURIComponent(`${url}/done`)}`, headers: { 'content-type': 'image/png' }, payload: await png(100, 60, rampCode(100)),
      });
      expect(accepted.statusCode).toBe(202);
      const [job] = await delivered;
      expect(job).toBe(accepted.json().id);
      expect(received.map((r) => r.polled)).toEqual(['done', 'done']);
      const last = received[1];
      expect(last.signature).toBe(createHmac('sha256', key).update(`${last.time}.${last.body}`).digest('base64url'));
      expect(JSON.parse(last.body)).toMatchObject({ job, state: 'done', manifest: { renditions: [{ width: 64 }, { width: 64 }] } });
    } finally {
      await g.close();
      target.closeAllConnections();
      target.close();
    }
  });

  it('while Redis is down, accepting and polling answer 503 with Retry-After; both work again when it returns', async () => {
    const e = await node();
    try {
      const bytes = await png(120, 70, rampCode(120));
      await server.kill();
      const refused = await post(e, bytes);
      expect(refused.statusCode).toBe(503);
      expect(refused.json().code).toBe('ERR_INGEST_QUEUE_DOWN');
      expect(refused.headers['retry-after']).toBe('2');
      const poll = await e.app.inject('/v1/ingest/jobs/j0123456789abcdef0123456789abcdef');
      expect(poll.statusCode).toBe(503);
      await server.restart();
      await e.queue.ready();
      const accepted = await post(e, bytes);
      expect(accepted.statusCode).toBe(202);
      expect(await settled(accepted.json().id, e)).toBe('done');
    } finally {
      await e.close();
    }
  });
});

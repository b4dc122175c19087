/**
 * Callback retries across a replica's death (issue 13): the callback target answers 503 at
 * first, then holds the next attempt unanswered; the replica making that attempt (a child
 * process of src/server.ts) is SIGKILLed mid-delivery; a second replica, started afterwards,
 * takes the delivery over once its lock lapses and delivers it when the target answers again.
 * Delivery is at least once (README): the target may see a body twice (here the held one and
 * the delivered one), the same outcome each time, each signed. Synchronised on the target's
 * events and the replicas' output, never on time.
 */
import { createHash, createHmac } from 'node:crypto';
import { EventEmitter, once } from 'node:events';
import { mkdir, mkdtemp, rm, writeFile } from 'node:fs/promises';
import { createServer, type Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { signUrl } from '../../src/security/signing.js';
import { redisBinary, startRedis, type RedisProcess } from '../helpers/redis-server.js';
import { png, rampCode } from '../ingest/fixtures.js';
import { type Proc, startReplica } from './cluster.js';

const key = 'a signing key for the weaving shop';

interface Received {
  body: string;
  time: string;
  signature: string;
  answer: number | 'held';
}

describe.skipIf(!redisBinary)('callback retries across a replica\'s death', { timeout: 120_000 }, () => {
  let dir: string;
  let redis: RedisProcess;
  let target: Server;
  let hook: string;
  let env: (i: number) => Record<string, string>;
  const procs: Proc[] = [];
  const received: Received[] = [];
  const events = new EventEmitter();
  // The target's answers in order: down (503), then it holds one attempt, then it is back.
  const plan: Array<number | 'held'> = [503, 'held'];

  beforeAll(async () => {
    dir = await mkdtemp(join(tmpdir(), 'fw-cb-failover-'));
    await mkdir(join(dir, 'sources'));
    redis = await startRedis();
    target = createServer((req, res) => {
      const chunks: Buffer[] = [];
      req.on('data', (c: Buffer) => chunks.push(c)).on('end', () => {
        const answer = plan.shift() ?? 204;
        received.push({
          body: Buffer.concat(chunks).toString(),
          time: String(req.headers['foldwise-callback-time']),
          signature: String(req.headers['foldwise-callback-signature']),
          answer,
        });
        res.on('error', () => undefined);
        if (answer !== 'held') res.writeHead(answer).end();
        events.emit(answer === 'held' ? 'held' : 'answered', answer);
      });
    });
    target.listen(0, '127.0.0.1');
    await once(target, 'listening');
    const origin = `http://127.0.0.1:${(target.address() as AddressInfo).port}`;
    hook = `${origin}/hooks/pictures`;
    const configFile = join(dir, 'config.json');
    await writeFile(configFile, JSON.stringify({
      origin: { generateDemo: false, upstream: { allowPrivate: true } },
      pool: { threads: 1 },
      // Load shedding off: two shared cores stall event loops at start.
      pressure: { maxEventLoopDelayMs: 0, maxHeapUsedBytes: 0, maxRssBytes: 0 },
      // A held attempt waits for its answer far longer than the test runs; the lock lapses fast.
      ingest: { jobLockMs: 1500, callbackBaseDelayMs: 100, callbackTimeoutMs: 120_000 },
      redis: { namespace: 'cb-failover:' },
      shutdown: { deadlineMs: 3000 },
    }));
    env = (i) => ({
      FOLDWISE_CONFIG: configFile,
      FOLDWISE_REDIS_URL: redis.url,
      FOLDWISE_SOURCE_DIR: join(dir, 'sources'),
      FOLDWISE_CACHE_DIR: join(dir, `cache-${i}`),
      FOLDWISE_SPOOL_DIR: 'off',
      FOLDWISE_SIGNING_KEY: key,
      FOLDWISE_UPSTREAM_HOSTS: origin,
    });
  }, 60_000);
  afterAll(async () => {
    await Promise.all(procs.map((p) => p.stop()));
    target?.closeAllConnections();
    target?.close();
    await redis?.stop();
    if (dir) await rm(dir, { recursive: true, force: true });
  }, 30_000);

  it('the replica holding the retry dies; another delivers the same signed outcome when the target is back', async () => {
    const a = await startReplica(env(0));
    procs.push(a);
    const bytes = await png(120, 80, rampCode(120));
    const digest = createHash('sha256').update(bytes).digest('hex');
    const held = once(events, 'held');
    const url = signUrl('/v1/ingest', { widths: '48,96', formats: 'png', digest, callback: hook }, key);
    const accepted = await fetch(`${a.url}${url}`, { method: 'POST', headers: { 'content-type': 'image/png' }, body: new Uint8Array(bytes) });
    expect(accepted.status).toBe(202);
    const { id } = (await accepted.json()) as { id: string };

    await held; // A's first attempt got a 503; its second waits, unanswered
    expect(received.map((r) => r.answer)).toEqual([503, 'held']);
    await a.kill(); // SIGKILL mid-delivery

    const answered = once(events, 'answered');
    const b = await startReplica(env(1));
    procs.push(b);
    await answered; // B took the delivery over once A's lock lapsed, and the target said 204
    expect(received.map((r) => r.answer)).toEqual([503, 'held', 204]);

    // Each body signed: HMAC-SHA256 (RFC 2104) of "<time>.<body>" under the signing key.
    for (const r of received) expect(r.signature).toBe(createHmac('sha256', key).update(`${r.time}.${r.body}`).digest('base64url'));
    // At least once: the same outcome every time (the held body may have been acted on).
    expect(new Set(received.map((r) => r.body)).size).toBe(1);
    const outcome = JSON.parse(received[2].body);
    expect(outcome).toMatchObject({ job: id, state: 'done' });
    expect(outcome.manifest.renditions.map((r: any) => [r.format, r.width, r.height])).toEqual([['png', 48, 32], ['png', 96, 64]]);

    const job = await (await fetch(`${b.url}/v1/ingest/jobs/${id}`)).json() as any;
    expect(job).toMatchObject({ id, state: 'done' });
    expect(job.manifest.renditions).toEqual(outcome.manifest.renditions);
    const metrics = await (await fetch(`${b.url}/metrics`)).text();
    expect(metrics).toMatch(/foldwise_ingest_callbacks_total\{outcome="delivered"\} 1\n/);
  });
});

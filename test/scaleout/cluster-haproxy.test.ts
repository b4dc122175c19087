/**
 * Two replicas (separate processes of src/server.ts) behind Debian's HAProxy on loopback,
 * sharing a real redis-server and an S3 API (s3rver). Everything goes through the load
 * balancer unless a step names one replica. Synchronised on the callback receiver's events
 * and on each replica's answers, never on time.
 */
import { createHash, createHmac } from 'node:crypto';
import { EventEmitter, once } from 'node:events';
import { mkdtemp, readdir, rm, writeFile } from 'node:fs/promises';
import { createServer, type Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { CreateBucketCommand, HeadObjectCommand, S3Client } from '@aws-sdk/client-s3';
import { Redis } from 'ioredis';
import S3rver from 's3rver';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { signUrl } from '../../src/security/signing.js';
import { freePort, redisBinary, startRedis, type RedisProcess } from '../helpers/redis-server.js';
import { gratingCode, png, rampCode } from '../ingest/fixtures.js';
import { haproxyBinary, type Proc, startHaproxy, startReplica } from './cluster.js';

const key = 'a signing key for the weaving shop';
const s3env = { AWS_ACCESS_KEY_ID: 'S3RVER', AWS_SECRET_ACCESS_KEY: 'S3RVER', AWS_REGION: 'us-east-1' };

let dir: string;
let redisProc: RedisProcess;
let redis: Redis;
let s3server: S3rver;
let s3: S3Client;
let receiver: Server;
const callbacks = new EventEmitter();
let hookUrl: string;
let envOf: (i: number) => Record<string, string>;
const ports: number[] = [];
const replicas: Proc[] = [];
let lb: Proc;

/** The outcome POSTed for job `id` (waits for it), with its signature checked. */
const callbackFor = (id: string) =>
  new Promise<any>((resolve) => {
    const on = (body: string, time: string, signature: string) => {
      const outcome = JSON.parse(body);
      if (outcome.job !== id) return;
      callbacks.off('callback', on);
      expect(signature).toBe(createHmac('sha256', key).update(`${time}.${body}`).digest('base64url'));
      resolve(outcome);
    };
    callbacks.on('callback', on);
  });

const upload = async (bytes: Buffer, widths: string, formats = 'webp,jpeg') => {
  const digest = createHash('sha256').update(bytes).digest('hex');
  const url = signUrl('/v1/ingest', { widths, formats, digest, callback: hookUrl }, key);
  return fetch(`${lb.url}${url}`, { method: 'POST', headers: { 'content-type': 'image/png' }, body: new Uint8Array(bytes) });
};

const skip = !redisBinary || !haproxyBinary;

describe.skipIf(skip)('two replicas behind HAProxy', { timeout: 120_000 }, () => {
  beforeAll(async () => {
    dir = await mkdtemp(join(tmpdir(), 'fw-cluster-'));
    redisProc = await startRedis();
    redis = new Redis(redisProc.url);
    s3server = new S3rver({ port: 0, address: '127.0.0.1', silent: true, directory: join(dir, 's3') });
    const endpoint = `http://127.0.0.1:${((await s3server.run()) as { port: number }).port}`;
    s3 = new S3Client({ endpoint, forcePathStyle: true, credentials: { accessKeyId: 'S3RVER', secretAccessKey: 'S3RVER' }, region: 'us-east-1' });
    await s3.send(new CreateBucketCommand({ Bucket: 'shop' }));
    receiver = createServer((req, res) => {
      const chunks: Buffer[] = [];
      req.on('data', (c: Buffer) => chunks.push(c)).on('end', () => {
        res.writeHead(204).end();
        callbacks.emit('callback', Buffer.concat(chunks).toString(), String(req.headers['foldwise-callback-time']), String(req.headers['foldwise-callback-signature']));
      });
    });
    receiver.listen(0, '127.0.0.1');
    await once(receiver, 'listening');
    const hookOrigin = `http://127.0.0.1:${(receiver.address() as AddressInfo).port}`;
    hookUrl = `${hookOrigin}/hooks/pictures`;
    ports.push(await freePort(), await freePort(), await freePort());
    const configFile = join(dir, 'config.json');
    await writeFile(configFile, JSON.stringify({
      server: { logLevel: 'info' },
      origin: { generateDemo: false, upstream: { allowPrivate: true } },
      pool: { threads: 1 },
      // Load shedding off: two cores shared with the test runner stall event loops for seconds.
      pressure: { maxEventLoopDelayMs: 0, maxHeapUsedBytes: 0, maxRssBytes: 0 },
      ingest: { jobLockMs: 1500, callbackBaseDelayMs: 200 },
      redis: { namespace: 'cluster:' },
      shutdown: { deadlineMs: 3000 },
    }));
    envOf = (i) => ({
      ...s3env,
      FOLDWISE_CONFIG: configFile,
      FOLDWISE_REDIS_URL: redisProc.url,
      FOLDWISE_STORE_URL: 's3://shop/pictures',
      FOLDWISE_S3_ENDPOINT: endpoint,
      FOLDWISE_CACHE_DIR: join(dir, `cache-${i}`),
      FOLDWISE_SPOOL_DIR: 'off',
      FOLDWISE_SIGNING_KEY: key,
      FOLDWISE_UPSTREAM_HOSTS: hookOrigin,
      FOLDWISE_PUBLIC_URL: `http://127.0.0.1:${ports[2]}`,
    });
    replicas.push(...(await Promise.all([startReplica(envOf(0), ports[0]), startReplica(envOf(1), ports[1])])));
    lb = await startHaproxy(dir, ports.slice(0, 2), ports[2]);
  }, 60_000);
  afterAll(async () => {
    await lb?.stop();
    await Promise.all(replicas.map((r) => r.stop()));
    receiver?.closeAllConnections();
    receiver?.close();
    redis?.disconnect();
    await redisProc?.stop();
    s3?.destroy();
    await s3server?.close().catch(() => undefined);
    if (dir) await rm(dir, { recursive: true, force: true });
  }, 30_000);

  let first: any;

  it('upload through the balancer; both replicas answer the poll; the callback brings the manifest; both render it', async () => {
    const res = await upload(await png(200, 120, rampCode(200)), '64,128');
    expect(res.status).toBe(202);
    const { id } = (await res.json()) as any;
    const done = callbackFor(id);
    for (const r of replicas) {
      const poll = await fetch(`${r.url}/v1/ingest/jobs/${id}`);
      expect(poll.status).toBe(200);
      expect(((await poll.json()) as any).id).toBe(id);
    }
    const outcome = await done;
    expect(outcome.state).toBe('done');
    first = outcome.manifest;
    expect(first.renditions).toHaveLength(4);
    for (const r of first.renditions) {
      expect(r.url.startsWith(`${lb.url}/v1/renditions/uploads/`)).toBe(true);
      const path = r.url.slice(lb.url.length);
      const answers = await Promise.all([fetch(r.url), ...replicas.map((p) => fetch(`${p.url}${path}`))]);
      expect(answers.map((a) => a.status)).toEqual([200, 200, 200]);
      expect(new Set(answers.map((a) => a.headers.get('etag')))).toEqual(new Set([r.etag]));
    }
    const polled = (await (await fetch(`${lb.url}/v1/ingest/jobs/${id}`)).json()) as any;
    expect(polled.manifest).toEqual(first);
  });

  it('the replica running a job is killed mid-job: the other finishes it and calls back', async () => {
    const res = await upload(await png(2400, 1600, gratingCode(0.31)), '2400,1800,1200,900', 'avif,webp,jpeg');
    expect(res.status).toBe(202);
    const { id } = (await res.json()) as any;
    const done = callbackFor(id);
    // Which replica runs it: each says so in its metrics (bounded number of looks).
    let holder = -1;
    for (let i = 0; i < 400 && holder < 0; i++) {
      for (const [n, r] of replicas.entries()) {
        const text = await (await fetch(`${r.url}/metrics`)).text();
        if (/^foldwise_ingest_queue_running 1$/m.test(text)) holder = n;
      }
    }
    expect(holder).toBeGreaterThanOrEqual(0);
    await replicas[holder].kill();
    const outcome = await done;
    expect(outcome.state).toBe('done');
    expect(outcome.manifest.renditions).toHaveLength(12);
    const job = (await (await fetch(`${lb.url}/v1/ingest/jobs/${id}`)).json()) as any;
    expect(job.state).toBe('done');
    replicas[holder] = await startReplica(envOf(holder), ports[holder]);
    first.second = outcome.manifest.source.key;
  });

  it('deleting the sources leaves nothing: 404 from both replicas, nothing in Redis, the store or either disk cache', async () => {
    for (const source of [first.source.key, first.second]) {
      const res = await fetch(`${lb.url}${signUrl(`/v1/sources/${source}`, {}, key)}`, { method: 'DELETE' });
      expect(res.status).toBe(200);
      const deletion = (await res.json()) as any;
      expect(deletion).toMatchObject({ source, removed: true });
      // The replica restarted a moment ago may not be subscribed yet (its memory is empty then);
      // every replica that was told confirmed before the answer.
      expect(deletion.confirmed).toBe(deletion.replicas);
      const head = await s3.send(new HeadObjectCommand({ Bucket: 'shop', Key: `pictures/${source}` })).then(() => 200, (e) => e.$metadata?.httpStatusCode);
      expect(head).toBe(404);
    }
    for (const r of first.renditions) {
      const path = r.url.slice(lb.url.length);
      for (const p of replicas) expect((await fetch(`${p.url}${path}`)).status).toBe(404);
    }
    expect(await redis.keys('cluster:c:*')).toEqual([]);
    expect(await redis.keys('cluster:src:*')).toEqual([]);
    for (const i of [0, 1]) {
      const files = await readdir(join(dir, `cache-${i}`), { recursive: true }).catch(() => []);
      expect(files.filter((f) => /^[0-9a-f]{2}\/[0-9a-f]{16,}/.test(String(f)))).toEqual([]);
    }
  });
});

/**
 * Two replicas behind Debian's HAProxy on loopback, sharing redis-server and s3rver (as the
 * cluster test): async uploads (accepted per second, p50/p99 time to a finished job), renders
 * of a miss/hit mix, and the upload run again with one replica SIGKILLed halfway (lost jobs,
 * failed requests during the failover, time until every accepted job is done). Bounded in
 * count; everything on 127.0.0.1; stops by itself.
 *   npx tsx load/cluster.ts [--connections 16] [--uploads 24] [--renders 300]
 */
import { mkdtemp, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { CreateBucketCommand, S3Client } from '@aws-sdk/client-s3';
import S3rver from 's3rver';
import { freePort, redisBinary, startRedis } from '../test/helpers/redis-server.js';
import { gratingCode, png } from '../test/ingest/fixtures.js';
import { haproxyBinary, type Proc, startHaproxy, startReplica } from '../test/scaleout/cluster.js';
import { quantile } from './lib/stats.js';
import { printTable } from './lib/table.js';

const arg = (name: string, fallback: number) => {
  const i = process.argv.indexOf(`--${name}`);
  return i > 0 ? Number(process.argv[i + 1]) : fallback;
};
const connections = arg('connections', 16);
const uploads = arg('uploads', 24);
const renders = arg('renders', 300);

/** Runs `count` tasks, `width` at a time. */
async function pool(count: number, width: number, task: (i: number) => Promise<void>): Promise<void> {
  let next = 0;
  await Promise.all(Array.from({ length: Math.min(width, count) }, async () => {
    while (next < count) await task(next++);
  }));
}

if (!redisBinary || !haproxyBinary) {
  console.log('load:cluster needs redis-server and haproxy (apt-get install redis-server haproxy)');
  process.exit(0);
}

const dir = await mkdtemp(join(tmpdir(), 'fw-load-cluster-'));
const redis = await startRedis();
const s3server = new S3rver({ port: 0, address: '127.0.0.1', silent: true, directory: join(dir, 's3') });
const endpoint = `http://127.0.0.1:${((await s3server.run()) as { port: number }).port}`;
const s3 = new S3Client({ endpoint, forcePathStyle: true, credentials: { accessKeyId: 'S3RVER', secretAccessKey: 'S3RVER' }, region: 'us-east-1' });
await s3.send(new CreateBucketCommand({ Bucket: 'shop' }));
const configFile = join(dir, 'config.json');
await writeFile(configFile, JSON.stringify({
  server: { logLevel: 'info' },
  origin: { generateDemo: false },
  ingest: { jobLockMs: 3000, maxJobs: 256 },
  pressure: { maxEventLoopDelayMs: 0 },
  shutdown: { deadlineMs: 5000 },
}));
const ports = [await freePort(), await freePort(), await freePort()];
const env = (i: number) => ({
  AWS_ACCESS_KEY_ID: 'S3RVER', AWS_SECRET_ACCESS_KEY: 'S3RVER', AWS_REGION: 'us-east-1',
  FOLDWISE_CONFIG: configFile, FOLDWISE_REDIS_URL: redis.url, FOLDWISE_STORE_URL: 's3://shop/pictures',
  FOLDWISE_S3_ENDPOINT: endpoint, FOLDWISE_CACHE_DIR: join(dir, `cache-${i}`), FOLDWISE_PUBLIC_URL: `http://127.0.0.1:${ports[2]}`,
});
const replicas: Proc[] = await Promise.all([startReplica(env(0), ports[0]), startReplica(env(1), ports[1])]);
const lb = await startHaproxy(dir, ports.slice(0, 2), ports[2]);

let seed = 0;
interface UploadRun { accepted: number; failed: number; seconds: number; toDone: number[]; lost: number; manifests: any[]; allDoneAfterKill?: number }

/** `count` distinct pictures uploaded async through the balancer; polls each job until it ends. */
async function uploadRun(count: number, onAccepted?: (n: number) => Promise<void>): Promise<UploadRun> {
  const run: UploadRun = { accepted: 0, failed: 0, seconds: 0, toDone: [], lost: 0, manifests: [] };
  const started = performance.now();
  await pool(count, connections, async () => {
    const bytes = await png(640, 480, gratingCode(0.05 + 0.4 * ((seed++ * 0.618) % 1)));
    const t0 = performance.now();
    const res = await fetch(`${lb.url}/v1/ingest?widths=160,320,640`, {
      method: 'POST', headers: { 'content-type': 'image/png', prefer: 'respond-async' }, body: new Uint8Array(bytes),
    }).catch(() => undefined);
    if (res?.status !== 202) {
      run.failed++;
      return;
    }
    const { id } = (await res.json()) as { id: string };
    run.accepted++;
    await onAccepted?.(run.accepted);
    // Poll every 50 ms for at most 120 s; a job not done by then is counted lost.
    for (let i = 0; i < 2400; i++) {
      const poll = await fetch(`${lb.url}/v1/ingest/jobs/${id}`).catch(() => undefined);
      if (!poll || poll.status !== 200) run.failed += 1;
      const job = poll?.status === 200 ? ((await poll.json()) as { state: string; manifest?: unknown }) : undefined;
      if (job?.state === 'done') {
        run.toDone.push(performance.now() - t0);
        run.manifests.push(job.manifest);
        return;
      }
      if (job?.state === 'failed') break;
      await new Promise((r) => setTimeout(r, 50));
    }
    run.lost++;
  });
  run.seconds = (performance.now() - started) / 1000;
  return run;
}

async function renderRun(manifests: any[]): Promise<{ rps: number; failed: string; misses: number }> {
  const sources = manifests.map((m) => m.source.key as string);
  const widths = [100, 200, 300, 400, 160, 320];
  let failed = 0;
  // Each failure by status (0: no answer), so a 503 load shed is told from a lost request.
  const statuses = new Map<number, number>();
  let misses = 0;
  const started = performance.now();
  await pool(renders, connections, async (i) => {
    // Deterministic mix: the ladder's widths are hits, the others misses until rendered once.
    const url = `${lb.url}/v1/renditions/${sources[i % sources.length]}?width=${widths[(i * 7) % widths.length]}&format=webp`;
    const res = await fetch(url).catch(() => undefined);
    if (!res || res.status !== 200) {
      failed++;
      statuses.set(res?.status ?? 0, (statuses.get(res?.status ?? 0) ?? 0) + 1);
    } else if ((res.headers.get('server-timing') ?? '').includes('miss')) misses++;
    await res?.arrayBuffer();
  });
  const by = [...statuses].map(([status, n]) => `${n} x ${status}`).join(', ');
  return { rps: renders / ((performance.now() - started) / 1000), failed: failed ? `${failed} (${by})` : '0', misses };
}

try {
  const steady = await uploadRun(uploads);
  const mix = await renderRun(steady.manifests);
  let killedAt = 0;
  const failover = await uploadRun(uploads, async (n) => {
    if (n === Math.ceil(uploads / 2) && killedAt === 0) {
      killedAt = performance.now();
      await replicas[0].kill();
    }
  });
  const recovered = (performance.now() - killedAt) / 1000;
  const ms = (v: number[], q: number) => (v.length ? quantile(v, q) : NaN);
  printTable(`load:cluster, ${connections} connections, HAProxy + 2 replicas, ${uploads} uploads of 640x480 PNG (3 widths x webp,jpeg)`, ['run', 'uploads/s', 'p50 to done (ms)', 'p99 to done (ms)', 'lost jobs', 'failed requests', 'all jobs done, s after the kill'], [
    ['steady', steady.accepted / steady.seconds, ms(steady.toDone, 0.5), ms(steady.toDone, 0.99), steady.lost, steady.failed, '-'],
    ['one replica killed halfway', failover.accepted / failover.seconds, ms(failover.toDone, 0.5), ms(failover.toDone, 0.99), failover.lost, failover.failed, recovered],
  ]);
  printTable('renders through HAProxy (miss/hit mix)', ['run', 'renders/s', 'misses', 'failed'], [['mixed', mix.rps, mix.misses, mix.failed]]);
} finally {
  await lb.stop();
  await Promise.all(replicas.map((r) => r.stop()));
  await redis.stop();
  s3.destroy();
  await s3server.close().catch(() => undefined);
  await rm(dir, { recursive: true, force: true });
}

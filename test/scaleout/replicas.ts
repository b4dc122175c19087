import { EventEmitter } from 'node:events';
import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Writable } from 'node:stream';
import { createFolderOrigin } from '../../src/origins/folder.js';
import type { Origin } from '../../src/origins/types.js';
import { build, type TestApp } from '../helpers/build.js';
import { writePng } from '../helpers/images.js';
import { startRedis, type RedisProcess } from '../helpers/redis-server.js';

/** A folder origin that counts source reads (one per render) and can hold them at a gate. */
export class GatedOrigin extends EventEmitter implements Origin {
  readonly name = 'gated-folder';
  reads = 0;
  private gate: Promise<void> | undefined;
  private opener: (() => void) | undefined;
  private readonly inner: Origin;

  constructor(root: string) {
    super();
    this.inner = createFolderOrigin(root);
  }

  /** Holds every read until open() is called. */
  close(): void {
    this.gate = new Promise((r) => (this.opener = r));
  }

  open(): void {
    this.opener?.();
    this.gate = undefined;
  }

  identify(path: string, signal?: AbortSignal) {
    return this.inner.identify(path, signal);
  }

  async read(path: string, signal?: AbortSignal) {
    this.reads += 1;
    this.emit('read', path);
    if (this.gate) await this.gate;
    return this.inner.read(path, signal);
  }
}

/** Log lines of one replica, as parsed pino objects. */
export type LogLines = Array<{ level: number; msg: string; [k: string]: unknown }>;

export interface Replica extends TestApp {
  origin: GatedOrigin;
  logs: LogLines;
}

/**
 * One replica of the service built with the project's build() helper, sharing `sourceDir`
 * and the Redis at `redisUrl` with its siblings. The breaker opens after two failures and
 * stays open briefly, so a test can watch it open and close; command bounds are generous
 * because a busy CI machine can stall an event loop for seconds (a killed Redis refuses
 * connections at once, so the outage path does not wait on them).
 */
export async function replica(sourceDir: string, redisUrl: string): Promise<Replica> {
  const origin = new GatedOrigin(sourceDir);
  const logs: LogLines = [];
  const stream = new Writable({
    write(chunk: Buffer, _enc, done) {
      for (const line of chunk.toString().split('\n')) if (line) logs.push(JSON.parse(line));
      done();
    },
  });
  const t = await build({
    sourceDir,
    origin,
    logger: { level: 'info', stream },
    config: {
      cache: { redisUrl },
      redis: { commandTimeoutMs: 10_000, connectTimeoutMs: 5_000, failureThreshold: 2, breakerOpenMs: 300, namespace: 'scaleout:' },
    },
  });
  await t.app.sharedRedis!.tier.link.ready();
  await t.app.purgeBus!.whenSubscribed(); // what /readyz waits for
  return Object.assign(t, { origin, logs });
}

/** A redis-server, a source folder holding one PNG, and two replicas sharing both. */
export interface Fleet {
  server: RedisProcess;
  dir: string;
  a: Replica;
  b: Replica;
  close(): Promise<void>;
}

export async function fleet(
  png: { name: string; width: number; height: number; pixel: (x: number, y: number) => number[] },
): Promise<Fleet> {
  const server = await startRedis();
  const dir = await mkdtemp(join(tmpdir(), 'fw-fleet-'));
  await writePng(dir, png.name, png.width, png.height, 3, png.pixel);
  const [a, b] = [await replica(dir, server.url), await replica(dir, server.url)];
  return {
    server, dir, a, b,
    async close() {
      await Promise.all([a.close(), b.close()]);
      await server.stop();
      await rm(dir, { recursive: true, force: true });
    },
  };
}

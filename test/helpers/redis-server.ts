import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { once } from 'node:events';
import { createServer } from 'node:net';

/** Path of the redis-server binary, or undefined when it is not installed. */
export const redisBinary: string | undefined = (() => {
  const found = spawnSync('sh', ['-c', 'command -v redis-server'], { encoding: 'utf8' });
  const path = found.stdout.trim();
  return found.status === 0 && path ? path : undefined;
})();

/** The reason tests that need Redis are skipped, printed once. */
export const redisSkipReason = redisBinary
  ? undefined
  : 'redis-server not found on PATH: Redis tests skipped (apt-get install redis-server; .ci/run does it)';
if (redisSkipReason) console.warn(redisSkipReason);

/**
 * Resolves on the emitter's next `event`. Unlike events.once it does not reject on 'error',
 * which a Redis client emits on every failed reconnect attempt while we wait for 'ready'.
 */
export function next(emitter: NodeJS.EventEmitter, event: string): Promise<void> {
  return new Promise((resolve) => emitter.once(event, () => resolve()));
}

/** A free TCP port on loopback (the kernel picks it; closed again before use). */
export async function freePort(): Promise<number> {
  const server = createServer();
  server.listen(0, '127.0.0.1');
  await once(server, 'listening');
  const address = server.address();
  const port = typeof address === 'object' && address ? address.port : 0;
  server.close();
  await once(server, 'close');
  return port;
}

/**
 * A real redis-server on 127.0.0.1 that can be killed and restarted: with no persistence by
 * default (a restart comes back empty), or with `persistDir` an append-only file fsynced at
 * every write (what a job queue's Redis runs with), so a killed server comes back with its data.
 */
export interface RedisProcess {
  port: number;
  url: string;
  /** SIGKILL (a crash, not a shutdown); resolves when the process has exited. */
  kill(): Promise<void>;
  /** Starts it again on the same port (empty without persistence, as after a crash). */
  restart(): Promise<void>;
  stop(): Promise<void>;
}

const READY = /Ready to accept connections/;

async function launch(port: number, persistDir?: string): Promise<ChildProcess> {
  if (!redisBinary) throw new Error(redisSkipReason);
  const persistence = persistDir ? ['--appendonly', 'yes', '--appendfsync', 'always', '--dir', persistDir] : ['--appendonly', 'no'];
  const child = spawn(
    redisBinary,
    ['--port', String(port), '--bind', '127.0.0.1', '--save', '', ...persistence, '--protected-mode', 'yes'],
    { stdio: ['ignore', 'pipe', 'pipe'] },
  );
  let log = '';
  await new Promise<void>((resolve, reject) => {
    const onData = (chunk: Buffer): void => {
      log += chunk.toString();
      if (READY.test(log)) {
        child.stdout?.off('data', onData);
        resolve();
      }
    };
    child.stdout?.on('data', onData);
    child.once('exit', (code) => reject(new Error(`redis-server exited (${code}) before ready:\n${log}`)));
    child.once('error', reject);
  });
  child.stdout?.resume();
  child.stderr?.resume();
  return child;
}

async function end(child: ChildProcess | undefined, signal: NodeJS.Signals): Promise<void> {
  if (!child || child.exitCode !== null || child.signalCode !== null) return;
  const exited = once(child, 'exit');
  child.kill(signal);
  await exited;
}

/** Starts redis-server on a random free loopback port and waits until it accepts connections. */
export async function startRedis(options: { persistDir?: string } = {}): Promise<RedisProcess> {
  const port = await freePort();
  let child: ChildProcess | undefined = await launch(port, options.persistDir);
  return {
    port,
    url: `redis://127.0.0.1:${port}`,
    async kill() {
      await end(child, 'SIGKILL');
    },
    async restart() {
      await end(child, 'SIGKILL');
      child = await launch(port, options.persistDir);
    },
    async stop() {
      await end(child, 'SIGTERM');
      child = undefined;
    },
  };
}

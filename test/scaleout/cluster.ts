/**
 * A small cluster on loopback for the load-balancer test and `npm run load:cluster`: replicas
 * of src/server.ts in their own processes, and Debian's HAProxy in front of them.
 */
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { once } from 'node:events';
import { writeFile } from 'node:fs/promises';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { freePort } from '../helpers/redis-server.js';

export const haproxyBinary: string | undefined = (() => {
  const found = spawnSync('sh', ['-c', 'command -v haproxy || ls /usr/sbin/haproxy'], { encoding: 'utf8' });
  const path = found.stdout.trim().split('\n')[0];
  return found.status === 0 && path ? path : undefined;
})();

export const haproxySkipReason = haproxyBinary
  ? undefined
  : 'haproxy not found: the load-balancer tests skipped (apt-get install haproxy; .ci/run does it)';
if (haproxySkipReason) console.warn(haproxySkipReason);

export interface Proc {
  port: number;
  url: string;
  child: ChildProcess;
  /** SIGKILL: a crash. */
  kill(): Promise<void>;
  /** SIGTERM, then SIGKILL after 10 s. */
  stop(): Promise<void>;
}

async function end(child: ChildProcess, signal: NodeJS.Signals): Promise<void> {
  if (child.exitCode !== null || child.signalCode !== null) return;
  const exited = once(child, 'exit');
  child.kill(signal);
  const timer = signal === 'SIGKILL' ? undefined : setTimeout(() => child.kill('SIGKILL'), 10_000);
  await exited;
  clearTimeout(timer);
}

function proc(child: ChildProcess, port: number): Proc {
  return { port, url: `http://127.0.0.1:${port}`, child, kill: () => end(child, 'SIGKILL'), stop: () => end(child, 'SIGTERM') };
}

/** Resolves when `child`'s output matches `ready`; rejects if it exits first. */
function ready(child: ChildProcess, pattern: RegExp, label: string): Promise<void> {
  return new Promise((resolve, reject) => {
    let out = '';
    const onData = (chunk: Buffer): void => {
      if (out.length < 65536) out += chunk.toString();
      if (pattern.test(out)) {
        child.stdout?.off('data', onData);
        child.stderr?.off('data', onData);
        child.stdout?.resume();
        child.stderr?.resume();
        resolve();
      }
    };
    child.stdout?.on('data', onData);
    child.stderr?.on('data', onData);
    child.once('exit', (code) => reject(new Error(`${label} exited (${code}) before ready:\n${out}`)));
  });
}

/** One replica: src/server.ts through tsx, with this environment, on a free loopback port. */
export async function startReplica(env: Record<string, string>, port?: number): Promise<Proc> {
  port ??= await freePort();
  const entry = fileURLToPath(new URL('../../src/server.ts', import.meta.url));
  const child = spawn(process.execPath, ['--import', 'tsx', entry], {
    env: { ...process.env, ...env, HOST: '127.0.0.1', PORT: String(port) },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  await ready(child, /foldwise ready/, `replica on ${port}`);
  return proc(child, port);
}

/** HAProxy on a free loopback port, round robin over `backends`, each checked on /readyz (as deploy/haproxy.cfg). */
export async function startHaproxy(dir: string, backends: number[], port?: number): Promise<Proc> {
  if (!haproxyBinary) throw new Error(haproxySkipReason);
  port ??= await freePort();
  const file = join(dir, 'haproxy.cfg');
  const servers = backends.map((p, i) => `  server r${i} 127.0.0.1:${p} check inter 200ms fall 2 rise 1`).join('\n');
  await writeFile(
    file,
    [
      'defaults',
      '  mode http',
      '  timeout connect 2s',
      '  timeout check 5s',
      '  timeout client 60s',
      '  timeout server 60s',
      '  retries 2',
      '  option redispatch',
      `frontend front`,
      `  bind 127.0.0.1:${port}`,
      '  default_backend replicas',
      'backend replicas',
      '  balance roundrobin',
      '  option httpchk GET /readyz',
      servers,
      '',
    ].join('\n'),
  );
  const child = spawn(haproxyBinary, ['-db', '-f', file], { stdio: ['ignore', 'pipe', 'pipe'] });
  // -db keeps it in the foreground; it is ready once it answers through the port.
  child.stdout?.resume();
  child.stderr?.resume();
  const p = proc(child, port);
  // HAProxy prints nothing once bound: connection attempts, 50 ms apart, 5 s at most.
  for (let i = 0; i < 100 && child.exitCode === null; i++) {
    if (await fetch(`${p.url}/healthz`).then((r) => r.ok, () => false)) return p;
    await new Promise((resolve) => setTimeout(resolve, 50));
  }
  await p.stop();
  throw new Error('haproxy did not answer on its port');
}

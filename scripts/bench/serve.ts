/**
 * The through-HTTP benchmarks' servers (service.ts, stages.ts): the service started as
 * `npm start` starts it (a child process, tsx src/server.ts, 127.0.0.1, a port it picks, a
 * fresh temporary cache folder), and a plain GET timed as a user meets it. Loopback only.
 */
import { spawn } from 'node:child_process';
import { once } from 'node:events';
import { createServer } from 'node:http';
import type { AddressInfo } from 'node:net';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = fileURLToPath(new URL('../../', import.meta.url));

export interface Server { url: string; pid: number; stop(): Promise<void> }
/** Settings over the service's defaults, by section. */
export interface ServiceSettings { pool?: Record<string, number>; cache?: Record<string, number> }
export interface Started { match: RegExpExecArray; pid: number; stop(): Promise<void> }

/** Starts `node <args>` and resolves, with the match, once its stdout matches `ready`. */
export async function startServer(args: string[], env: Record<string, string>, ready: RegExp): Promise<Started> {
  const child = spawn(process.execPath, args, { cwd: root, env: { ...process.env, ...env }, stdio: ['ignore', 'pipe', 'inherit'] });
  const match = await new Promise<RegExpExecArray>((resolve, reject) => {
    let out = '';
    child.stdout!.on('data', (d: Buffer) => {
      if (out.length < 1 << 16) out += d.toString();
      const m = ready.exec(out);
      if (m) resolve(m);
    });
    child.once('exit', (code) => reject(new Error(`${args.join(' ')} exited (${code}) before it was ready:\n${out}`)));
  });
  child.stdout!.resume();
  const stop = async () => {
    if (child.exitCode !== null || child.signalCode !== null) return;
    const exited = once(child, 'exit');
    child.kill('SIGTERM');
    await exited;
  };
  return { match, pid: child.pid!, stop };
}

/**
 * The service as `npm start` runs it, on a port it picks, with a fresh cache folder; `nodeArgs`
 * go before the entry (e.g. `--cpu-prof`), `settings` over the pool's and the cache's (e.g.
 * `{ pool: { threadNice: 5 } }`, `{ cache: { decodedBytes: 0 } }`).
 */
export async function startService(sourceDir: string, nodeArgs: string[] = [], settings: ServiceSettings = {}): Promise<Server> {
  const dir = mkdtempSync(join(tmpdir(), 'foldwise-bench-'));
  const config = join(dir, 'config.json');
  // Load shedding on event-loop delay is off: on a busy shared machine a start-up stall of
  // over a second sheds the very first request, and this measures render cost, not shedding.
  const all = { origin: { sourceDir, generateDemo: false }, cache: { dir: join(dir, 'cache'), ...settings.cache }, server: { port: 0 }, pressure: { maxEventLoopDelayMs: 0 }, pool: settings.pool ?? {} };
  writeFileSync(config, JSON.stringify(all));
  const s = await startServer([...nodeArgs, '--import', 'tsx', 'src/server.ts'], { FOLDWISE_CONFIG: config, HOST: '127.0.0.1' }, /"msg":"Server listening at http:\/\/127\.0\.0\.1:(\d+)"[\s\S]*foldwise ready/);
  return { url: `http://127.0.0.1:${s.match[1]}`, pid: s.pid, stop: async () => { await s.stop(); rmSync(dir, { recursive: true, force: true }); } };
}

/**
 * Loads this process's own fetch (undici is loaded on the first call: ~30-40 ms measured on a
 * busy two-core machine) on a data: URL, and then its HTTP client (connection pool, response
 * parser) on one GET of a throwaway server of this process on 127.0.0.1, so no timed request
 * pays for the client's start-up (scripts/bench/timeline.ts showed the first timed request
 * reaching the service ~9 ms after it was sent, the next ones ~2 ms, and ~7 ms with this);
 * the service is not asked anything.
 */
export async function warmClient(): Promise<void> {
  await (await fetch('data:text/plain,warm')).text();
  const server = createServer((_req, res) => res.end('warm'));
  server.listen(0, '127.0.0.1');
  await once(server, 'listening');
  try {
    const { port } = server.address() as AddressInfo;
    await (await fetch(`http://127.0.0.1:${port}/`)).text();
  } finally {
    server.closeAllConnections();
    server.close();
  }
}

/** One GET, body read to the end: wall time in ms and the response; fails on anything but 200. */
export async function timedFetch(url: string): Promise<{ ms: number; res: Response; bytes: number }> {
  const t = performance.now();
  const res = await fetch(url);
  const body = await res.arrayBuffer();
  if (res.status !== 200) throw new Error(`${url} answered ${res.status}: ${Buffer.from(body).toString().slice(0, 300)}`);
  return { ms: performance.now() - t, res, bytes: body.byteLength };
}

/** Wall time of one GET, body read to the end, in ms; fails on anything but 200. */
export async function timedGet(url: string): Promise<number> {
  return (await timedFetch(url)).ms;
}

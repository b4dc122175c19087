/**
 * A fresh service per hostile scenario: its own process (load/lib/child.ts), its own copy of
 * the sources, its own cache folder and its own spool folder under /dev/shm, so a scenario
 * starts from nothing and its memory is measured alone: peak VmRSS of the process plus the
 * bytes in its spool folder. A safety cap kills the server before it can starve the machine.
 */
import { mkdtempSync, readdirSync, rmSync, statSync, writeFileSync, existsSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { type ChildServer, startChild } from './child.js';
import { pause, send } from './probe.js';

export interface HostileServer extends ChildServer {
  spoolDir: string;
  /** Peak RSS + spool bytes since start (sampled every 100 ms); `capped` if the cap killed it. */
  peak(): { bytes: number; capped: boolean };
  /** The process has exited (crashed, or killed at the cap). */
  dead(): boolean;
  dispose(): Promise<void>;
}

/** Bytes of the files under `dir` (blocks really used: /dev/shm is memory). */
export function folderBytes(dir: string): number {
  let total = 0;
  let entries: string[] = [];
  try {
    entries = readdirSync(dir, { recursive: true }) as string[];
  } catch {
    return 0;
  }
  for (const e of entries) {
    try {
      const st = statSync(join(dir, e));
      if (st.isFile()) total += st.blocks * 512;
    } catch {
      // removed while we looked
    }
  }
  return total;
}

export async function startHostile(sourceDir: string, extra: Record<string, unknown>, capBytes: number): Promise<HostileServer> {
  const work = mkdtempSync(join(tmpdir(), 'foldwise-hostile-'));
  const shmBase = existsSync('/dev/shm') ? '/dev/shm' : tmpdir();
  const spoolDir = mkdtempSync(join(shmBase, 'foldwise-hostile-spool-'));
  const { origin, ...rest } = extra as { origin?: Record<string, unknown> };
  const config = {
    server: { logLevel: 'warn' },
    origin: { sourceDir, generateDemo: false, ...origin },
    cache: { dir: join(work, 'cache') },
    pool: { spoolDir },
    ...rest,
  };
  writeFileSync(join(work, 'config.json'), JSON.stringify(config, null, 2));
  const child = await startChild('app', { FOLDWISE_CONFIG: join(work, 'config.json') });
  let peak = child.rss() + folderBytes(spoolDir);
  let capped = false;
  let exited = false;
  const timer = setInterval(() => {
    const rss = child.rss();
    if (rss === 0) exited = true;
    peak = Math.max(peak, rss + folderBytes(spoolDir));
    if (peak > capBytes && !capped) {
      capped = true;
      process.kill(child.pid, 'SIGKILL');
    }
  }, 100);
  return {
    ...child,
    spoolDir,
    peak: () => ({ bytes: Math.max(peak, child.rss() + folderBytes(spoolDir)), capped }),
    dead: () => exited || capped,
    async dispose() {
      clearInterval(timer);
      await child.stop();
      rmSync(work, { recursive: true, force: true });
      rmSync(spoolDir, { recursive: true, force: true });
    },
  };
}

/**
 * Seconds from now until /readyz answers 200 AND a normal miss (a new width of the small
 * source) renders with 200; Infinity if that does not happen within `capSeconds`.
 */
export async function recovery(server: HostileServer, small: string, capSeconds: number): Promise<number> {
  const t0 = performance.now();
  const deadline = t0 + capSeconds * 1000;
  let width = 101;
  while (performance.now() < deadline && !server.dead()) {
    const ready = await send(server.url, '/readyz', { timeoutMs: 5000 });
    if (ready.kind === 'status' && ready.status === 200) {
      const miss = await send(server.url, `/v1/renditions/${small}?width=${width++}&format=jpeg`, { timeoutMs: 10_000 });
      if (miss.kind === 'status' && miss.status === 200) return (performance.now() - t0) / 1000;
    }
    await pause(250);
  }
  return Infinity;
}

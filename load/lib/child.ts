import { spawn, type ChildProcess } from 'node:child_process';
import { once } from 'node:events';
import { createWriteStream, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';

/** A server script run in its own process, so its memory and CPU are its own. */
export interface ChildServer {
  pid: number;
  port: number;
  /** Where the server's log (stdout) goes. */
  logFile: string;
  url: string;
  /** Resident set size now, from /proc (Linux), in bytes; 0 where /proc is absent. */
  rss(): number;
  /** CPU time used so far (user + system, all threads), from /proc (Linux), in seconds; 0 where absent. */
  cpuSeconds(): number;
  stop(): Promise<void>;
}

/**
 * Starts `load/lib/serve.ts <mode>` with tsx; it prints `listening <port>` once bound to
 * 127.0.0.1. Extra environment goes to the child (config, Redis URL, thread pool size);
 * `nodeArgs` to node itself (e.g. --cpu-prof to profile the server).
 */
export async function startChild(mode: string, env: Record<string, string> = {}, nodeArgs: string[] = []): Promise<ChildServer> {
  const entry = fileURLToPath(new URL('./serve.ts', import.meta.url));
  const child: ChildProcess = spawn(process.execPath, [...nodeArgs, '--import', 'tsx', entry, mode], {
    env: { ...process.env, ...env },
    stdio: ['ignore', 'pipe', 'inherit'],
  });
  const logFile = join(tmpdir(), `foldwise-load-${mode}-${child.pid}.log`);
  const log = createWriteStream(logFile);
  child.stdout!.pipe(log);
  const port = await new Promise<number>((resolve, reject) => {
    let out = '';
    child.stdout!.on('data', (chunk: Buffer) => {
      if (out.length > 4096) return;
      out += chunk.toString();
      const m = /listening (\d+)/.exec(out);
      if (m) resolve(Number(m[1]));
    });
    child.once('exit', (code) => reject(new Error(`server '${mode}' exited (${code}) before listening:\n${out}`)));
  });
  const pid = child.pid!;
  return {
    pid,
    port,
    logFile,
    url: `http://127.0.0.1:${port}`,
    rss: () => {
      try {
        const m = /VmRSS:\s+(\d+) kB/.exec(readFileSync(`/proc/${pid}/status`, 'utf8'));
        return m ? Number(m[1]) * 1024 : 0;
      } catch {
        return 0;
      }
    },
    cpuSeconds: () => {
      try {
        // Fields 14 and 15 of /proc/<pid>/stat, in clock ticks (USER_HZ, 100 on Linux; proc(5)).
        // The command name (field 2) may hold spaces, so count from its closing parenthesis.
        const stat = readFileSync(`/proc/${pid}/stat`, 'utf8');
        const fields = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
        return (Number(fields[11]) + Number(fields[12])) / 100;
      } catch {
        return 0;
      }
    },
    async stop() {
      if (child.exitCode !== null || child.signalCode !== null) return;
      const exited = once(child, 'exit');
      child.kill('SIGTERM');
      const timer = setTimeout(() => child.kill('SIGKILL'), 10_000);
      await exited;
      clearTimeout(timer);
    },
  };
}

/** Samples a child's RSS every `ms` until stopped; returns the peak. */
export function sampleRss(server: ChildServer, ms = 100): { stop(): number } {
  let peak = server.rss();
  const timer = setInterval(() => (peak = Math.max(peak, server.rss())), ms);
  return {
    stop() {
      clearInterval(timer);
      return Math.max(peak, server.rss());
    },
  };
}

/**
 * The HTTP client of load/hostile.ts: one socket per request to 127.0.0.1 only, so a request
 * that ends without any status (the server closed the socket) is told apart from one the
 * client gave up on (`timeout`) or dropped on purpose (`aborted`).
 */
import http from 'node:http';

export type Outcome =
  | { kind: 'status'; status: number; ms: number; bytes: number }
  | { kind: 'none' | 'timeout' | 'aborted'; ms: number };

export interface SendOptions {
  method?: string;
  headers?: Record<string, string>;
  body?: Buffer;
  /** The client gives up after this long (counted as `timeout`). */
  timeoutMs?: number;
  /** The client walks away after this long (counted as `aborted`), like an impatient browser. */
  abortAfterMs?: number;
}

/** Refuses any base URL that is not loopback: these scenarios never leave the machine. */
export function loopbackPort(base: string): number {
  const url = new URL(base);
  if (url.hostname !== '127.0.0.1') throw new Error(`hostile load only targets 127.0.0.1, not ${url.hostname}`);
  return Number(url.port);
}

export function send(base: string, path: string, o: SendOptions = {}): Promise<Outcome> {
  const port = loopbackPort(base);
  const t0 = performance.now();
  const ms = () => performance.now() - t0;
  return new Promise((resolve) => {
    let reason: 'timeout' | 'aborted' | undefined;
    let settled = false;
    const done = (out: Outcome): void => {
      if (settled) return;
      settled = true;
      clearTimeout(timeout);
      clearTimeout(abort);
      resolve(out);
    };
    const req = http.request({ host: '127.0.0.1', port, path, method: o.method ?? 'GET', headers: o.headers, agent: false }, (res) => {
      let bytes = 0;
      res.on('data', (chunk: Buffer) => (bytes += chunk.length));
      // A status line was received: it counts as that status even if the body is cut short.
      const end = () => done({ kind: 'status', status: res.statusCode ?? 0, ms: ms(), bytes });
      res.once('end', end).once('error', end).once('close', end);
    });
    req.once('error', () => done({ kind: reason ?? 'none', ms: ms() }));
    const timeout = setTimeout(() => ((reason = 'timeout'), req.destroy()), o.timeoutMs ?? 40_000);
    const abort = o.abortAfterMs === undefined ? undefined : setTimeout(() => ((reason = 'aborted'), req.destroy()), o.abortAfterMs);
    req.end(o.body);
  });
}

/** Status counts of one scenario, e.g. "200:4 503:8 none:2". */
export class Tally {
  readonly counts = new Map<string, number>();
  readonly outcomes: Outcome[] = [];

  add(o: Outcome): Outcome {
    this.outcomes.push(o);
    const key = o.kind === 'status' ? String(o.status) : o.kind;
    this.counts.set(key, (this.counts.get(key) ?? 0) + 1);
    return o;
  }

  count(key: string): number {
    return this.counts.get(key) ?? 0;
  }

  toString(): string {
    return [...this.counts].sort(([a], [b]) => a.localeCompare(b)).map(([k, n]) => `${k}:${n}`).join(' ') || '-';
  }
}

/** Runs `connections` loops of `one` until `until` (a performance.now() time) has passed. */
export async function flood(connections: number, until: number, one: (i: number) => Promise<unknown>): Promise<void> {
  let n = 0;
  const loop = async () => {
    while (performance.now() < until) await one(n++);
  };
  await Promise.all(Array.from({ length: connections }, loop));
}

export const pause = (ms: number) => new Promise<void>((resolve) => setTimeout(resolve, ms));

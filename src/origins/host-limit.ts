import { FoldwiseError } from '../errors.js';

interface HostLine {
  running: number;
  line: Array<() => void>;
}

/**
 * At most `perHost` requests to one upstream host at once; the rest wait in line, first come
 * first served, for at most `waitMs` (then ERR_UPSTREAM_TIMEOUT) or until their caller aborts.
 * So one slow upstream holds a bounded number of connections (and of the renders waiting on
 * them), and cannot be stormed by a miss flood either.
 */
export class HostLimit {
  private readonly hosts = new Map<string, HostLine>();

  constructor(readonly perHost: number, private readonly waitMs: number) {
    if (!(perHost >= 1 && Number.isInteger(perHost))) throw new RangeError('perHost must be a positive integer');
  }

  /** Requests to `host` running now (for tests and metrics). */
  running(host: string): number {
    return this.hosts.get(host)?.running ?? 0;
  }

  async run<T>(host: string, work: () => Promise<T>, signal?: AbortSignal): Promise<T> {
    const h = this.hosts.get(host) ?? { running: 0, line: [] };
    this.hosts.set(host, h);
    if (h.running >= this.perHost) await this.wait(host, h, signal);
    else h.running += 1;
    try {
      return await work();
    } finally {
      const next = h.line.shift();
      if (next) next(); // the permit passes on directly
      else {
        h.running -= 1;
        if (h.running === 0) this.hosts.delete(host);
      }
    }
  }

  private wait(host: string, h: HostLine, signal?: AbortSignal): Promise<void> {
    return new Promise<void>((resolve, reject) => {
      const leave = (error: unknown): void => {
        const i = h.line.indexOf(admitted);
        if (i >= 0) h.line.splice(i, 1);
        clearTimeout(timer);
        signal?.removeEventListener('abort', onAbort);
        reject(error);
      };
      const admitted = (): void => {
        clearTimeout(timer);
        signal?.removeEventListener('abort', onAbort);
        resolve();
      };
      const onAbort = (): void => leave(signal?.reason);
      const timer = setTimeout(
        () => leave(new FoldwiseError('ERR_UPSTREAM_TIMEOUT', `${this.perHost} requests to ${host} were in flight for ${this.waitMs} ms (origin.upstream.perHostConcurrency)`)),
        this.waitMs,
      );
      if (signal?.aborted) return leave(signal.reason);
      signal?.addEventListener('abort', onAbort, { once: true });
      h.line.push(admitted);
    });
  }
}

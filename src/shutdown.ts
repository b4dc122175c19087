import type { FastifyInstance } from 'fastify';
import type { Logger } from 'pino';
import { withinMs } from './lib/deadline.js';

export interface ShutdownOptions {
  /** Time allowed for in-flight requests (and renders) to finish before giving up. */
  deadlineMs: number;
  signals?: NodeJS.Signals[];
  /** Ends the process; injectable for tests. */
  exit?: (code: number) => void;
}

export interface ShutdownHandle {
  /** Starts the shutdown (idempotent); resolves with the exit code it chose. */
  shutdown(reason: string): Promise<number>;
  /** Whether the shutdown has begun (a signal came, or shutdown() was called). */
  begun(): boolean;
  /** Removes the signal handlers. */
  dispose(): void;
}

/** Longest wait for the log's last lines to be written before the process ends. */
const flushLimitMs = 2_000;

/**
 * Waits (at most flushLimitMs) until the logger has handed its buffered lines on: the pretty
 * printer runs in a transport thread that ends with the process, so lines logged just before
 * exit were lost.
 */
function flushLog(app: FastifyInstance): Promise<void> {
  const log = app.log as Partial<Pick<Logger, 'flush'>>;
  if (typeof log.flush !== 'function') return Promise.resolve();
  const flush = log.flush.bind(log);
  const flushed = new Promise<void>((resolve) => flush(() => resolve()));
  return withinMs(flushed, flushLimitMs, () => new Error('log flush timed out')).catch(() => undefined);
}

/**
 * Graceful shutdown for the process shell. On the first signal: stop accepting connections
 * (Fastify's close: the listener closes, idle keep-alive sockets are dropped, requests that
 * arrive on busy sockets get 503), let in-flight requests finish, then run the plugins' onClose
 * hooks (accepted async ingest jobs drain first, then the worker pool, Redis). If that takes
 * longer than the deadline, exit 1 anyway. A second signal exits at once.
 */
export function installShutdown(app: FastifyInstance, options: ShutdownOptions): ShutdownHandle {
  const signals = options.signals ?? ['SIGTERM', 'SIGINT'];
  const exit = options.exit ?? ((code: number) => process.exit(code));
  let started: Promise<number> | undefined;

  const shutdown = (reason: string): Promise<number> => {
    if (started) return started;
    app.log.info({ reason, deadlineMs: options.deadlineMs }, 'shutting down: no new connections, finishing in-flight work');
    started = new Promise<number>((resolve) => {
      const timer = setTimeout(() => {
        app.log.error({ deadlineMs: options.deadlineMs }, 'shutdown deadline passed with work still in flight');
        resolve(1);
      }, options.deadlineMs);
      timer.unref();
      app.close().then(
        () => {
          clearTimeout(timer);
          app.log.info('shutdown complete');
          resolve(0);
        },
        (err: unknown) => {
          clearTimeout(timer);
          app.log.error({ err }, 'error while closing');
          resolve(1);
        },
      );
    }).then(async (code) => {
      await flushLog(app);
      exit(code);
      return code;
    });
    return started;
  };

  const onSignal = (signal: NodeJS.Signals): void => {
    if (started) {
      app.log.warn({ signal }, 'second signal: exiting now');
      exit(1);
      return;
    }
    void shutdown(signal);
  };
  for (const s of signals) process.on(s, onSignal);

  return {
    shutdown,
    begun: () => started !== undefined,
    dispose: () => {
      for (const s of signals) process.off(s, onSignal);
    },
  };
}

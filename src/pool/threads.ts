import { createRequire } from 'node:module';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { availableParallelism } from 'node:os';
import { Piscina } from 'piscina';
import { FoldwiseError } from '../errors.js';
import type { BandOutcome, ResampleTask, WorkerSetup } from './worker.js';
import { type BandPiscina, piscinaRunner, type RunBand } from './runner.js';
import { type RenderPoolOptions, runningPerThread } from './options.js';
import { type PoolRefusal, refusal } from './refusals.js';
import { ownSignal } from './tasks.js';
import { warmThreads } from './warm-start.js';
import { SpoolDir } from './spool/dir.js';

/** Running from TypeScript sources (tsx, vitest): workers need tsx's loader too. */
const fromSource = import.meta.url.endsWith('.ts');
const workerFile = fileURLToPath(new URL(fromSource ? './worker.ts' : './worker.js', import.meta.url));
// tsx resolved from this package, not from the working directory: the CLI runs from anywhere.
const tsxLoader = fromSource ? pathToFileURL(createRequire(import.meta.url).resolve('tsx')).href : '';

// A process started with --cpu-prof (scripts/bench/stages.ts) profiles its worker threads too:
// a worker given its own execArgv does not inherit the process's.
const profiling = process.execArgv.filter((a) => a.startsWith('--cpu-prof'));

/** The pool's piscina: `threads` worker threads running worker.ts, for `maxRunning` jobs at once. */
function startThreads(threads: number, maxRunning: number, nice: number): BandPiscina {
  const setup: WorkerSetup = { nice };
  return new Piscina<ResampleTask, BandOutcome>({
    filename: workerFile,
    workerData: setup,
    minThreads: threads,
    maxThreads: threads,
    // At most `maxRunning` jobs reach the pool, with at most three tasks each at once: two
    // bands, or a band and the new source's analysis, or a band beside the decision (its rest
    // handed over once the decision has settled), or the decision and then the bands.
    maxQueue: 3 * maxRunning,
    // piscina's default has an idle thread block in Atomics.wait, still holding its last
    // task: the collection a large source's task schedules (worker.ts) never ran, and one
    // mapping the size of that source stayed for good. Message events let it run.
    atomics: 'disabled',
    execArgv: [...(fromSource ? ['--import', tsxLoader] : []), ...profiling],
  });
}

/**
 * The pool's threads and their life: started with the pool, warmed once (what /readyz waits
 * for), named tasks of worker.ts run with the pool's refusals, closed at shutdown. RenderPool
 * (render-pool.ts) adds admission by memory and the renders.
 *
 * Every way a task can be cut short has its own answer: the render's deadline gives
 * ERR_RENDER_TIMEOUT and the pool closing (shutdown) ERR_SERVICE_STOPPING, both 503 with
 * Retry-After, since a retry (later, or on another replica) can succeed; only a task that
 * failed by itself (a worker that crashed or threw) is ERR_RENDER_FAILED (500).
 */
export class PoolThreads {
  readonly threads: number;
  readonly retryAfterSeconds: number;
  protected readonly piscina: BandPiscina;
  protected readonly runBand: RunBand;
  /** Tasks given to piscina and not yet settled; fewer than `threads` means a thread is free. */
  private running = 0;
  private readonly idleWaiters: Array<() => void> = [];
  private warming?: Promise<void>;
  private isWarm = false;
  protected closing?: Promise<void>;
  /** Where spooled decodes write (resampleSpooled), or null when spooling is off or unavailable. */
  readonly spool: SpoolDir | null;

  constructor(opts: RenderPoolOptions) {
    this.threads = opts.threads > 0 ? opts.threads : availableParallelism();
    this.retryAfterSeconds = opts.retryAfterSeconds;
    this.spool = SpoolDir.open(opts.spoolDir ?? 'off');
    this.piscina = startThreads(this.threads, runningPerThread * this.threads, opts.threadNice ?? 0);
    const run = (opts.runner ?? piscinaRunner)(this.piscina);
    this.runBand = (task, options) => this.counted(() => run(task, options));
  }

  /** Resolves once fewer tasks run than there are threads (at once when so already). */
  whenIdle(): Promise<void> {
    if (this.running < this.threads) return Promise.resolve();
    return new Promise((resolve) => this.idleWaiters.push(resolve));
  }

  /** Runs a piscina task, counted in `running`. */
  private async counted<T>(run: () => Promise<T>): Promise<T> {
    this.running++;
    try {
      return await run();
    } finally {
      this.running--;
      if (this.running < this.threads) for (const wake of this.idleWaiters.splice(0)) wake();
    }
  }

  get utilization(): number {
    return this.piscina.utilization;
  }

  /** A 503 refusal with Retry-After: the deadline passed, or the pool is closing. */
  refusal(code: PoolRefusal, detail: string, cause?: unknown): FoldwiseError {
    return refusal(code, detail, this.retryAfterSeconds, cause);
  }

  /**
   * Resolves once every thread has started, compiled its SIMD kernels and rendered, analysed
   * and decided once (warm.ts), and this thread has run sharp's codecs once (codec/warm.ts):
   * what /readyz waits for. Rejects only when the pool closes first.
   */
  warm(): Promise<void> {
    this.warming ??= warmThreads(this.threads, (task) => this.task('warm', task), this.spool).then(() => {
      this.isWarm = true;
    });
    return this.warming;
  }

  /** Whether warm() has resolved. */
  get warmed(): boolean {
    return this.isWarm;
  }

  /** Runs a named task of worker.ts, with the same refusals as a render's bands. */
  protected async task<T>(name: string, task: object, signal?: AbortSignal): Promise<T> {
    if (this.closing) throw this.stopping();
    const own = ownSignal(signal);
    try {
      // Named tasks answer their own types, not a band's outcome.
      return (await this.counted(() => this.piscina.run(task as ResampleTask, { name, signal: own.signal }))) as unknown as T;
    } catch (e) {
      if (signal?.aborted && signal.reason instanceof FoldwiseError) throw signal.reason;
      if (signal?.aborted) throw this.refusal('ERR_RENDER_TIMEOUT', `the ${name} task took longer than allowed`, e);
      if (this.closing) throw this.stopping(e);
      throw new FoldwiseError('ERR_RENDER_FAILED', `the ${name} task failed`, { cause: e });
    } finally {
      own.unlink();
    }
  }

  /** Refuses new renders at once, lets running tasks finish (piscina's close), then ends the threads. */
  close(): Promise<void> {
    this.closing ??= this.piscina.close().finally(() => this.spool?.close());
    return this.closing;
  }

  protected stopping(cause?: unknown): FoldwiseError {
    return this.refusal('ERR_SERVICE_STOPPING', 'the render pool is shutting down', cause);
  }
}

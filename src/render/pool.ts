import { availableParallelism } from 'node:os';
import { createRequire } from 'node:module';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { Piscina } from 'piscina';
import type { PixelRaster, Plan } from '../core/types.js';
import { FoldwiseError } from '../errors.js';
import type { ResampleTask, SharedRaster } from '../worker.js';

export interface RenderPoolOptions {
  /** Worker threads; 0 = one per available core. */
  threads: number;
  /** Renders allowed to wait beyond one per thread. */
  maxQueue: number;
  retryAfterSeconds: number;
}

/** Running from TypeScript sources (tsx, vitest): workers need tsx's loader too. */
const fromSource = import.meta.url.endsWith('.ts');
const workerFile = fileURLToPath(new URL(fromSource ? '../worker.ts' : '../worker.js', import.meta.url));
// tsx resolved from this package, not from the working directory: the CLI runs from anywhere.
const tsxLoader = fromSource ? pathToFileURL(createRequire(import.meta.url).resolve('tsx')).href : '';

// Below this many output pixels one worker does the whole rendition: a split would cost more
// in hand-off than it saves (common practice; revisit with load/ measurements).
const SPLIT_MIN_PIXELS = 512 * 512;

function share(raster: PixelRaster): SharedRaster {
  const depth = raster.data instanceof Uint16Array ? 16 : 8;
  const buffer = new SharedArrayBuffer(raster.data.byteLength);
  (depth === 16 ? new Uint16Array(buffer) : new Uint8Array(buffer)).set(raster.data);
  return { buffer, width: raster.width, height: raster.height, channels: raster.channels, depth };
}

/**
 * The CPU side of rendering: a piscina pool of worker threads running the core, with admission
 * control. At most `threads + maxQueue` renders are admitted at once; past that `admit` throws
 * ERR_OVERLOADED (503 with Retry-After) instead of letting work pile up without bound.
 */
export class RenderPool {
  readonly threads: number;
  readonly bound: number;
  private admitted = 0;
  private readonly piscina: Piscina<ResampleTask, number>;

  constructor(private readonly opts: RenderPoolOptions) {
    this.threads = opts.threads > 0 ? opts.threads : availableParallelism();
    this.bound = this.threads + opts.maxQueue;
    this.piscina = new Piscina<ResampleTask, number>({
      filename: workerFile,
      minThreads: this.threads,
      maxThreads: this.threads,
      // Two band tasks per render at most, so the pool queue never exceeds twice the bound.
      maxQueue: Math.max(1, 2 * this.bound),
      execArgv: fromSource ? ['--import', tsxLoader] : [],
    });
  }

  /** Renders admitted and not yet released. */
  get inFlight(): number {
    return this.admitted;
  }

  /** Tasks waiting for a worker. */
  get queueDepth(): number {
    return this.piscina.queueSize;
  }

  get utilization(): number {
    return this.piscina.utilization;
  }

  /** Reserves a render slot; call the returned function exactly once when done. */
  admit(): () => void {
    if (this.admitted >= this.bound) {
      const s = this.opts.retryAfterSeconds;
      throw new FoldwiseError('ERR_OVERLOADED', `all ${this.bound} render slots are busy; retry in ${s} s`, {
        headers: { 'retry-after': String(s) },
      });
    }
    this.admitted += 1;
    let released = false;
    return () => {
      if (!released) (released = true), (this.admitted -= 1);
    };
  }

  /** Resamples `src` by `plan` in the pool; big outputs are split into two bands of rows. */
  async resample(src: PixelRaster, plan: Plan, signal?: AbortSignal): Promise<PixelRaster> {
    const shared = share(src);
    const bytesPer = shared.depth / 8;
    const out = new SharedArrayBuffer(plan.targetWidth * plan.targetHeight * src.channels * bytesPer);
    const h = plan.targetHeight;
    const split = this.threads > 1 && plan.targetWidth * h >= SPLIT_MIN_PIXELS;
    const bands: [number, number][] = split ? [[0, h >> 1], [h >> 1, h]] : [[0, h]];
    try {
      await Promise.all(bands.map((rows) => this.piscina.run({ src: shared, plan, rows, out }, { signal })));
    } catch (e) {
      if (signal?.aborted) throw new FoldwiseError('ERR_RENDER_TIMEOUT', 'resampling took longer than allowed', { cause: e });
      throw new FoldwiseError('ERR_RENDER_FAILED', 'resampling failed', { cause: e });
    }
    const data = shared.depth === 16 ? new Uint16Array(out) : new Uint8Array(out);
    return { data, width: plan.targetWidth, height: plan.targetHeight, channels: src.channels };
  }

  async close(): Promise<void> {
    await this.piscina.close();
  }
}

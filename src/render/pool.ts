import { availableParallelism } from 'node:os';
import { createRequire } from 'node:module';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { Piscina } from 'piscina';
import type { PixelRaster, Plan } from '../core/types.js';
import { FoldwiseError } from '../errors.js';
import type { ResampleTask, SharedRaster } from '../worker.js';
import { Admission } from './admission.js';

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
 * The CPU side of rendering: a piscina pool of worker threads running the core, behind
 * admission control (src/render/admission.ts): one render per thread holds pixels at a time,
 * `maxQueue` more wait, and past that `admit` throws ERR_OVERLOADED (503 with Retry-After)
 * instead of letting work and memory pile up without bound.
 */
export class RenderPool {
  readonly threads: number;
  private readonly admission: Admission;
  private readonly piscina: Piscina<ResampleTask, number>;

  constructor(opts: RenderPoolOptions) {
    this.threads = opts.threads > 0 ? opts.threads : availableParallelism();
    this.admission = new Admission(this.threads, opts.maxQueue, opts.retryAfterSeconds);
    this.piscina = new Piscina<ResampleTask, number>({
      filename: workerFile,
      minThreads: this.threads,
      maxThreads: this.threads,
      // At most one render per thread reaches the pool, with two band tasks each.
      maxQueue: Math.max(1, 2 * this.threads),
      execArgv: fromSource ? ['--import', tsxLoader] : [],
    });
  }

  /** Most renders in flight (running + waiting) before refusals start. */
  get bound(): number {
    return this.admission.bound;
  }

  /** Renders admitted and not yet released, running or waiting. */
  get inFlight(): number {
    return this.admission.inFlight;
  }

  /** Renders waiting for a slot plus band tasks waiting for a worker thread. */
  get queueDepth(): number {
    return this.admission.waiting + this.piscina.queueSize;
  }

  get utilization(): number {
    return this.piscina.utilization;
  }

  /** Waits for a render slot (or throws ERR_OVERLOADED); call the returned function when done. */
  admit(): Promise<() => void> {
    return this.admission.admit();
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

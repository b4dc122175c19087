/** Two worker threads each render half the output rows from one shared copy of the source. */
import { Worker } from 'node:worker_threads';
import { createRequire } from 'node:module';
import { pathToFileURL } from 'node:url';
import type { PixelRaster, Plan } from '../../src/core/types.js';

export class BandPool {
  private readonly workers: Worker[];
  private next = 0;
  private readonly waiting = new Map<number, (data: Uint8Array) => void>();

  constructor(size: number) {
    // Workers do not inherit the TypeScript loader: register tsx first, then load the worker.
    const api = pathToFileURL(createRequire(import.meta.url).resolve('tsx/esm/api').replace(/\.cjs$/, '.mjs')).href;
    const entry = new URL('./band-worker.ts', import.meta.url).href;
    const boot = `import { register } from ${JSON.stringify(api)}; register(); await import(${JSON.stringify(entry)});`;
    this.workers = Array.from({ length: size }, () => {
      const w = new Worker(new URL(`data:text/javascript,${encodeURIComponent(boot)}`));
      w.on('message', (m: { id: number; data: Uint8Array }) => {
        this.waiting.get(m.id)!(m.data);
        this.waiting.delete(m.id);
      });
      return w;
    });
  }

  /** Copies the source into shared memory once, then renders the bands in parallel. */
  async render(src: PixelRaster, plan: Plan): Promise<PixelRaster> {
    const shared = new SharedArrayBuffer(src.data.byteLength);
    new Uint8Array(shared).set(src.data as Uint8Array);
    const n = this.workers.length;
    const cuts = Array.from({ length: n + 1 }, (_, i) => Math.round((i * plan.targetHeight) / n));
    const parts = await Promise.all(
      this.workers.map((w, i) => new Promise<Uint8Array>((resolve) => {
        const id = this.next++;
        this.waiting.set(id, resolve);
        w.postMessage({ id, shared, width: src.width, height: src.height, channels: src.channels, plan, rows: [cuts[i], cuts[i + 1]] });
      })),
    );
    const data = new Uint8Array(plan.targetWidth * plan.targetHeight * src.channels);
    let at = 0;
    for (const p of parts) { data.set(p, at); at += p.length; }
    return { data, width: plan.targetWidth, height: plan.targetHeight, channels: src.channels };
  }

  async close(): Promise<void> {
    await Promise.all(this.workers.map((w) => w.terminate()));
  }
}

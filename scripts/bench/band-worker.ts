/** Benchmark worker: renders one band of output rows from a source held in shared memory. */
import { parentPort } from 'node:worker_threads';
import { renderRaster } from '../../src/core/index.js';
import type { Channels, Plan } from '../../src/core/types.js';

interface Job {
  id: number;
  shared: SharedArrayBuffer;
  width: number;
  height: number;
  channels: Channels;
  plan: Plan;
  rows: [number, number];
}

parentPort!.on('message', (job: Job) => {
  const data = new Uint8Array(job.shared, 0, job.width * job.height * job.channels);
  const out = renderRaster({ data, width: job.width, height: job.height, channels: job.channels }, job.plan, { rows: job.rows });
  const bytes = out.data as Uint8Array;
  parentPort!.postMessage({ id: job.id, data: bytes }, [bytes.buffer as ArrayBuffer]);
});

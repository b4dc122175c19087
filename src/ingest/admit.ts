import type { Limits } from '../config.js';
import { readHeader } from '../codec/header.js';
import type { Lease } from '../pool/budget.js';
import { decodeCost, outputCost, stagingCost } from '../pool/cost.js';
import type { RenderPool } from '../pool/render-pool.js';
import { decodeLimits, ladderWish } from '../rendition/source.js';
import type { IngestFormat } from '../schemas/ingest.js';
import { heightFor, ladderFor } from './ladder.js';

/** A ladder build's hold on the memory budget, and how many of its renditions may run at once under it. */
export interface LadderLease {
  lease: Lease;
  concurrency: number;
}

/**
 * Admits the decode alone (the upload's check that its bytes are an image within the limits):
 * the ladder's decode, every frame of an animation (ladderWish), as the build will decode it.
 */
export async function admitDecode(pool: RenderPool, bytes: Buffer, limits: Limits): Promise<Lease> {
  const h = await readHeader(bytes, decodeLimits(limits), ladderWish);
  return pool.admit(decodeCost(h), `decoding a ${h.width}x${h.height} ${8 * h.bytesPerSample}-bit upload`);
}

/**
 * Admits a ladder build as one job: the decoded source, held for the whole ladder, plus
 * `concurrency` renditions at once (each a staging copy, its output raster and the encoder of
 * the costliest format at the widest step). When the budget cannot hold that many, fewer run
 * at once (down to one); when it cannot hold one, the budget refuses with 413.
 */
export async function admitLadder(
  pool: RenderPool,
  bytes: Buffer,
  limits: Limits,
  opts: { widths?: readonly number[]; formats: readonly IngestFormat[]; concurrency: number },
): Promise<LadderLease> {
  const h = await readHeader(bytes, decodeLimits(limits), ladderWish);
  const widest = Math.max(...ladderFor(h.width, opts.widths));
  const pixels = widest * heightFor(h.width, h.height, widest);
  const perRendition = stagingCost(h) + Math.max(...opts.formats.map((f) => outputCost(h, pixels, f)));
  const source = decodeCost(h);
  const room = Math.floor((pool.memory().budgetBytes - source) / perRendition);
  const concurrency = Math.max(1, Math.min(opts.concurrency, room));
  const lease = await pool.admit(source + concurrency * perRendition, `a rendition ladder of a ${h.width}x${h.height} ${8 * h.bytesPerSample}-bit source`);
  return { lease, concurrency };
}

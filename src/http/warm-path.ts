/**
 * The main thread's side of the warm start: one rendition of a picture generated here, through
 * the real render path (renderRendition: admission, the spooled decode, the render and the new
 * source's analysis in the pool, the encode, a cache store), with an origin, cache and spectrum
 * store of its own, so nothing of it reaches the service's cache, index or metrics. The first
 * request then finds that path's code compiled and libvips' buffers made for a picture of this
 * class, instead of paying for them.
 */
import type { FastifyInstance } from 'fastify';
import { MemoryTier } from '../cache/memory.js';
import { TieredCache } from '../cache/tiered.js';
import type { CacheEntry } from '../cache/types.js';
import { encodeImage } from '../codec/encode.js';
import { kernelNames } from '../core/index.js';
import { SingleFlight } from '../lib/single-flight.js';
import type { Origin, SourceIdentity } from '../origins/types.js';
import { renderRendition } from '../rendition/service.js';
import { adaptivePrefilter } from '../risk/service.js';
import { SpectrumStore } from '../risk/spectrum-store.js';
import { KeptDecodes } from '../pool/spool/kept.js';
import { imgAccept } from './warm-start.js';
import { warmUpHeaders } from './warm-up-token.js';
import { renditionsPrefix } from '../schemas/paths.js';
import { compileRenditionQuery } from '../schemas/rendition.js';

/** Just above the streamed path's threshold (rendition/streamed.ts: 1 MP). */
const WIDTH = 1280;
const HEIGHT = 832;

/** Woven-looking stripes in colour, as the demo's fabrics (a code-made picture). */
function picture(): Uint8Array {
  const data = new Uint8Array(WIDTH * HEIGHT * 3);
  for (let y = 0; y < HEIGHT; y++) {
    for (let x = 0; x < WIDTH; x++) {
      const i = (y * WIDTH + x) * 3;
      const warp = Math.cos(2 * Math.PI * 0.21 * x);
      const weft = Math.cos(2 * Math.PI * 0.13 * y);
      data[i] = Math.round(140 + 60 * warp);
      data[i + 1] = Math.round(110 + 50 * weft);
      data[i + 2] = Math.round(90 + 40 * warp * weft);
    }
  }
  return data;
}

/** A source name no folder holds: the warm-up's requests through the route end in 404. */
export const WARM_UP_SOURCE = 'foldwise-warm-up-no-such-source.jpg';

/**
 * Asks the rendition route itself, twice, for a source that does not exist: what a render does
 * not reach on the main thread (fastify's routing and hooks, the route's query reading, the
 * folder origin's look-up, the error answer) is compiled before the first request. Measured
 * with scripts/bench/timeline.ts, four starts each: the first request's time outside the
 * handler 11-15 -> 6.5-9 ms and to its origin look-up 8.4-10 -> 4.3-5.6 ms.
 */
async function warmRoute(app: FastifyInstance): Promise<void> {
  app.log.info({ source: WARM_UP_SOURCE }, 'warm-up requests through the rendition route (404 expected)');
  for (let i = 0; i < 2; i++) {
    await app.inject({ url: `${renditionsPrefix}${WARM_UP_SOURCE}?width=400`, headers: { accept: imgAccept, ...warmUpHeaders() } });
  }
}

/** Renders the generated picture twice (a new source, then a further width), then asks the route; never throws. */
export async function warmRenderPath(app: FastifyInstance): Promise<boolean> {
  try {
    const raster = { data: picture(), width: WIDTH, height: HEIGHT, channels: 3 as const };
    const bytes = await encodeImage(raster, { format: 'jpeg', quality: 90, background: { r: 255, g: 255, b: 255 } });
    const identity: SourceIdentity = { key: 'warm-start.jpg', version: 'warm' };
    const origin: Origin = { name: 'warm', read: async () => ({ identity, bytes }), identify: async () => identity };
    const spectra = new SpectrumStore({ maxBytes: 2 ** 20 });
    // Its own kept decodes, so the further width takes a further width's path (the kept decode).
    const spool = app.renderPool.spool;
    const keptDecodes = spool ? new KeptDecodes(4 * WIDTH * HEIGHT * 3, (path) => spool.remove(path)) : undefined;
    const ctx = {
      origin,
      cache: new TieredCache([new MemoryTier(2 ** 22)]),
      flight: new SingleFlight<CacheEntry>(),
      pool: app.renderPool,
      limits: app.config.limits,
      adaptive: adaptivePrefilter(spectra, app.renderPool),
      keptDecodes,
    };
    const query = compileRenditionQuery({ maxDimension: app.config.limits.maxDimension, kernelNames });
    try {
      for (const width of ['400', '300']) await renderRendition(ctx, identity.key, query.parse({ width, format: 'jpeg' }));
    } finally {
      keptDecodes?.clear();
      await keptDecodes?.settled();
    }
    await warmRoute(app);
    return true;
  } catch (err) {
    app.log.warn({ err }, 'the warm-up render failed');
    return false;
  }
}

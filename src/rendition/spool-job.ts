import type { DecodeWish } from '../codec/decode.js';
import type { SpoolableSource } from '../codec/spool-decode.js';
import type { RenderPool } from '../pool/render-pool.js';
import type { DecodedShape, DecodeOf, KeptDecodes } from '../pool/spool/kept.js';
import type { SpoolDir } from '../pool/spool/dir.js';
import type { ReadSource } from './source.js';

/**
 * Which decode of `source` a wish asks for: the kept decodes' key (src/pool/spool/kept.ts).
 * Only stills are spooled, whose first frame and every frame are the same raster (servesWish).
 */
export function decodeOf(source: ReadSource, wish: DecodeWish): DecodeOf {
  return { key: source.identity.key, version: source.identity.version, wish: `${wish.gamut} ${wish.frames === 'all' ? 0 : wish.frames}` };
}

/** A decode into a fresh file of the pool's spool folder (the streamed render's, the alias-risk report's). */
export interface SpoolJob {
  file: string;
  shape: DecodedShape;
  /** Settles when libvips has written the last row (rejects with the decode's errors, or SpoolWriteError). */
  decoding: Promise<void>;
  /**
   * Ends the job once nothing reads its file: with `keep` (the decode ended cleanly) the file is
   * kept for the next rendition of the source when the kept decodes take it; else it is removed
   * (`removed` settles then) and removed again once libvips is done with it (a deadline may
   * settle `decoding` while libvips writes on, or before its job got a thread), or it would hold
   * memory in /dev/shm until the pool closes. Renditions waiting for this decode are woken either way.
   */
  end(keep: boolean): { kept: boolean; removed: Promise<void> };
}

/**
 * Starts `probe`'s decode into a fresh spool file, its bytes counted as spool memory
 * (RenderPool.holdSpool) until the file is removed. While it runs, and when its file can be
 * kept, other renditions of the same decode find it in progress (KeptDecodes.decoding) and wait
 * for its file instead of decoding the source beside it.
 */
export function startSpoolDecode(pool: RenderPool, spool: SpoolDir, kept: KeptDecodes | undefined, probe: SpoolableSource, of: DecodeOf): SpoolJob {
  const { width, height, channels, depth, format } = probe;
  const shape: DecodedShape = { width, height, channels, depth, format };
  const bytes = width * height * channels * (depth / 8);
  const file = spool.path();
  const unhold = pool.holdSpool(bytes);
  const wake = kept?.takes(bytes) ? kept.starts(of) : undefined;
  const decoding = probe.write(file);
  const end = (keep: boolean) => {
    const keptIt = keep && kept?.keep(of, file, shape, bytes, unhold) === true;
    wake?.();
    if (keptIt) return { kept: true, removed: Promise.resolve() };
    const removed = spool.remove(file);
    probe.idle().then(() => spool.remove(file)).catch(() => undefined).finally(unhold);
    return { kept: false, removed };
  };
  return { file, shape, decoding, end };
}

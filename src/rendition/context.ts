import type { Flight } from '../lib/single-flight.js';
import type { TieredCache } from '../cache/tiered.js';
import type { CacheEntry } from '../cache/types.js';
import type { Limits } from '../config.js';
import type { Origin, SourceIdentity } from '../origins/types.js';
import type { RenderPool } from '../pool/render-pool.js';
import type { IdentityMemo } from './identity.js';
import type { SourceMemo } from './source-memo.js';
import type { KeptDecodes } from '../pool/spool/kept.js';
import type { LoadedSource } from './source.js';
import type { AdaptivePrefilter } from './prefilter.js';
import type { Stage, StageClock } from './timings.js';

/** Everything a render needs; no Fastify request, so ingest and the CLI can call it too. */
export interface RenderContext {
  origin: Origin;
  /** Told of each rendition about to be stored, by its source's key (the index deletion uses). */
  onStored?: (source: string, key: string) => void;
  cache: TieredCache;
  flight: Flight<CacheEntry>;
  pool: RenderPool;
  limits: Limits;
  /** Stage durations, for metrics. */
  observe?: (stage: Stage, seconds: number) => void;
  /** Cache outcome of each call: 'hit-<tier>' or 'miss'. */
  onLookup?: (result: string) => void;
  /** Short-lived memo of source identities (hits then skip the origin); default ask the origin. */
  identities?: IdentityMemo;
  /** The bytes of sources read lately (source-memo.ts): a further rendition skips the origin read; default read every time. */
  sources?: SourceMemo;
  /** Finished decodes kept in the spool folder (src/pool/spool/kept.ts): a further rendition skips the decode; default decode every time. */
  keptDecodes?: KeptDecodes;
  /**
   * Content-adaptive prefilter (alias-risk analysis, src/risk/service.ts), asked only when
   * prefilter=auto and the plan shrinks; it analyses and decides in the pool's threads.
   * Without it prefilter=auto is the kernel's own.
   */
  adaptive?: AdaptivePrefilter;
  /**
   * A source the caller has already read and decoded (the upload hook's ladder, the alias-risk
   * preview): a miss renders from it instead of reading and decoding again, when it is the
   * version of the path asked for.
   */
  decoded?: LoadedSource;
  /**
   * The caller holds a lease of the memory budget covering this render (the upload hook's
   * ladder): the render is not admitted again.
   */
  admitted?: boolean;
  /** Aborts when no one waits for the render any more (every caller gone): ERR_REQUEST_ABANDONED. */
  signal?: AbortSignal;
  /** The refusal a miss gets while the process sheds load (hits are still served), else null. */
  shedding?: Error | null;
  /**
   * Answer a miss once the memory tier has it, while the disk and Redis tiers are still being
   * written (the render's flight, and other replicas waiting on it, hold until they are): the
   * rendition route. Callers that report a rendition as stored (the upload hook, warm) leave it
   * off and wait for every tier.
   */
  answerFirst?: boolean;
}

/** A render's context inside the service: its stage clock and the identity asked for. */
export interface RenditionContextInternal extends RenderContext {
  clock: StageClock;
  /** The identity renderRendition found for the path (the cache key's). */
  asked: SourceIdentity;
}

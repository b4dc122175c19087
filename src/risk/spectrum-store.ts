/**
 * One spectrum analysis per source version: many widths, views and renditions of the same
 * source cost one Welch analysis. L1 is an in-process LRU bounded in bytes; below it the
 * rendition cache's shared tiers (the disk folder, Redis) keep each analysis next to the
 * renditions, so a restarted process or another replica reuses it instead of analysing again.
 */
import { LRUCache } from 'lru-cache';
import { analyzeSpectrum, type SourceSpectrum } from '../core/risk/index.js';
import type { PixelRaster } from '../core/types.js';
import { packValue, unpackValue } from '../cache/pack.js';
import type { CacheEntry, CacheTier } from '../cache/types.js';
import { SingleFlight } from '../lib/single-flight.js';
import type { SourceIdentity } from '../origins/types.js';

/** Bump when the analysis changes (tiles, window, units): stored spectra then stop matching. */
export const spectrumVersion = 'fw-spectrum-3';

/** The content type a stored analysis carries in a cache tier (never served over HTTP). */
export const SPECTRUM_TYPE = 'application/vnd.foldwise.spectrum';

export interface SpectrumStoreOptions {
  /** L1 budget in bytes. */
  maxBytes: number;
  /** Tiers below L1, in lookup order (the rendition cache's disk and Redis tiers); none by default. */
  tiers?: readonly CacheTier[];
  /** Called when a tier's read or write fails (the analysis is still served). */
  onSharedError?: (error: unknown) => void;
  /** Runs one analysis; default analyzeSpectrum in this thread (the app gives the pool's). */
  analyser?: (raster: PixelRaster) => Promise<SourceSpectrum>;
  /** Told of each analysis about to be stored in the tiers below L1, by its source's key (for deletion). */
  onShared?: (source: string, key: string) => void;
}

/**
 * Smaller sources keep their analysis in memory only: it takes about as long to redo as to
 * read back from a tier, and would only crowd the tiers' entries.
 */
export const SHARED_MIN_PIXELS = 1 << 20;

/** Where a spectrum came from. */
export type SpectrumOrigin = 'memory' | 'shared' | 'analysed';

const bytesOf = (s: SourceSpectrum) => s.power.byteLength + s.grid.power.byteLength + 512;

/** A stored analysis as a cache entry (pack.ts's byte form). */
function entryOf(key: string, s: SourceSpectrum): CacheEntry {
  return { body: packValue(s), contentType: SPECTRUM_TYPE, etag: `"${key}"`, headers: {}, createdAt: Date.now() };
}

/** The analysis a cache entry holds, or undefined when it is not one. */
function spectrumOf(entry: CacheEntry | undefined): SourceSpectrum | undefined {
  if (!entry || entry.contentType !== SPECTRUM_TYPE) return undefined;
  try {
    const s = unpackValue<SourceSpectrum>(entry.body);
    return s.power instanceof Float32Array && s.grid?.power instanceof Float32Array ? s : undefined;
  } catch {
    return undefined;
  }
}

export class SpectrumStore {
  private readonly lru: LRUCache<string, SourceSpectrum>;
  private readonly byRaster = new WeakMap<PixelRaster, SourceSpectrum>();
  private readonly inflight = new SingleFlight<SourceSpectrum>();
  private readonly writes = new Set<Promise<void>>();
  /** Analyses run by this store (for metrics and tests). */
  analyses = 0;

  constructor(private readonly options: SpectrumStoreOptions) {
    this.lru = new LRUCache<string, SourceSpectrum>({ maxSize: options.maxBytes, sizeCalculation: bytesOf });
  }

  /** The cache key of one source version. */
  keyOf(identity: SourceIdentity): string {
    return `spectrum:${spectrumVersion}:${identity.version}:${identity.key}`;
  }

  private remember(key: string | undefined, raster: PixelRaster | undefined, s: SourceSpectrum): void {
    if (key) this.lru.set(key, s);
    if (raster) this.byRaster.set(raster, s);
  }

  private analyse(raster: PixelRaster): Promise<SourceSpectrum> {
    this.analyses++;
    return this.options.analyser?.(raster) ?? Promise.resolve(analyzeSpectrum(raster));
  }

  /** Forgets every version's analysis of a source from L1 (it was deleted). */
  forget(sourceKey: string): void {
    for (const key of [...this.lru.keys()]) if (key.endsWith(`:${sourceKey}`)) this.lru.delete(key);
  }

  /**
   * The spectrum of a raster already in memory (an upload's): L1 by identity, or this raster's
   * earlier analysis, or the tiers below L1, or a new one now (kept in L1 and, in the
   * background, in the tiers).
   */
  async ofRaster(raster: PixelRaster, identity?: SourceIdentity): Promise<SourceSpectrum> {
    const key = identity ? this.keyOf(identity) : undefined;
    const known = (key && this.lru.get(key)) || this.byRaster.get(raster) || (key && (await this.stored(key)));
    if (known) {
      this.remember(key, raster, known);
      return known;
    }
    const s = await this.analyse(raster);
    this.remember(key, raster, s);
    if (identity) void this.store(identity, s);
    return s;
  }

  /**
   * Writes an analysis to every tier below L1 (sources of SHARED_MIN_PIXELS or more);
   * failures are reported, never thrown. The source index is told first (onShared), so a
   * deletion finds the key.
   */
  private store(identity: SourceIdentity, s: SourceSpectrum): Promise<void> {
    const tiers = this.options.tiers ?? [];
    if (tiers.length === 0 || s.width * s.height < SHARED_MIN_PIXELS) return Promise.resolve();
    const key = this.keyOf(identity);
    this.options.onShared?.(identity.key, key);
    const entry = entryOf(key, s);
    const write = Promise.all(tiers.map((t) => t.set(key, entry).catch((e: unknown) => this.options.onSharedError?.(e)))).then(() => undefined);
    this.writes.add(write);
    void write.finally(() => this.writes.delete(write));
    return write;
  }

  /** Resolves once every tier write started so far has ended (for shutdown and tests). */
  async settled(): Promise<void> {
    await Promise.all([...this.writes]);
  }

  /** The first tier below L1 that holds the analysis, read back; undefined when none does. */
  private async stored(key: string): Promise<SourceSpectrum | undefined> {
    for (const tier of this.options.tiers ?? []) {
      const entry = await tier.get(key).catch((e: unknown) => {
        this.options.onSharedError?.(e);
        return undefined;
      });
      const s = spectrumOf(entry);
      if (s) return s;
    }
    return undefined;
  }

  /**
   * The spectrum of a source version from L1 or, failing that, the tiers below it (then kept in
   * L1); undefined when no tier has it. Never analyses.
   */
  async lookup(identity: SourceIdentity): Promise<SourceSpectrum | undefined> {
    const key = this.keyOf(identity);
    const hit = this.lru.get(key);
    if (hit) return hit;
    const s = await this.stored(key);
    if (s) this.lru.set(key, s);
    return s;
  }

  /** Keeps an analysis made elsewhere (the pool's) in L1 and every tier below it; counts it. */
  keep(identity: SourceIdentity, s: SourceSpectrum): Promise<void> {
    const key = this.keyOf(identity);
    this.analyses++;
    this.lru.set(key, s);
    return this.store(identity, s);
  }

  /**
   * The spectrum of a source version: L1, then L2, else `produce` decodes the source and hands
   * its raster to `analyse` (it may hold a render slot meanwhile), or analyses it its own way
   * and hands the result to `made` as soon as it has it (counted, and in L1 at once: a decision
   * asked before `produce` returns finds it); once however many callers ask at the same time.
   */
  async get(
    identity: SourceIdentity,
    produce: (analyse: (raster: PixelRaster) => Promise<SourceSpectrum>, made: (s: SourceSpectrum) => void) => Promise<SourceSpectrum>,
  ): Promise<{ spectrum: SourceSpectrum; from: SpectrumOrigin }> {
    const key = this.keyOf(identity);
    const hit = this.lru.get(key);
    if (hit) return { spectrum: hit, from: 'memory' };
    // A caller that joins a running analysis never runs the work: its `from` stays 'analysed'.
    let from: SpectrumOrigin = 'analysed';
    const { value } = await this.inflight.run(key, async () => {
      const stored = await this.stored(key);
      if (stored) {
        from = 'shared';
        this.remember(key, undefined, stored);
        return stored;
      }
      const s = await produce(async (raster) => {
        const made = await this.analyse(raster);
        this.remember(undefined, raster, made);
        return made;
      }, (made) => {
        this.analyses++;
        this.remember(key, undefined, made);
      });
      this.remember(key, undefined, s);
      await this.store(identity, s);
      return s;
    });
    return { spectrum: value, from };
  }
}

/**
 * One spectrum analysis per source version: many widths, views and renditions of the same
 * source cost one Welch analysis. L1 is an in-process LRU bounded in bytes; L2, when the app
 * has a shared tier (Redis), lets every replica reuse one replica's analysis.
 */
import { LRUCache } from 'lru-cache';
import { analyzeSpectrum, type SourceSpectrum } from '../core/risk/index.js';
import type { PixelRaster } from '../core/types.js';
import { SingleFlight } from '../lib/single-flight.js';
import type { SourceIdentity } from '../origins/types.js';

/** Bump when the analysis changes (tiles, window, units): stored spectra then stop matching. */
export const spectrumVersion = 'fw-spectrum-3';

/** The part of a shared tier the store uses (RedisTier has it). */
export interface SharedValues {
  getValue<T>(key: string): Promise<T | undefined>;
  setValue(key: string, value: unknown): Promise<void>;
}

export interface SpectrumStoreOptions {
  /** L1 budget in bytes. */
  maxBytes: number;
  shared?: SharedValues | null;
  /** Called when a shared-tier write fails (the analysis is still served). */
  onSharedError?: (error: unknown) => void;
  /** Told of each analysis about to be stored in the shared tier, by its source's key (for deletion). */
  onShared?: (source: string, key: string) => void;
}

/** Where a spectrum came from. */
export type SpectrumOrigin = 'memory' | 'shared' | 'analysed';

const bytesOf = (s: SourceSpectrum) => s.power.byteLength + s.grid.power.byteLength + 512;

export class SpectrumStore {
  private readonly lru: LRUCache<string, SourceSpectrum>;
  private readonly byRaster = new WeakMap<PixelRaster, SourceSpectrum>();
  private readonly inflight = new SingleFlight<SourceSpectrum>();
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

  private analyse(raster: PixelRaster): SourceSpectrum {
    this.analyses++;
    return analyzeSpectrum(raster);
  }

  /** Forgets every version's analysis of a source from L1 (it was deleted). */
  forget(sourceKey: string): void {
    for (const key of [...this.lru.keys()]) if (key.endsWith(`:${sourceKey}`)) this.lru.delete(key);
  }

  /** The spectrum of a source version when this process has it at hand (L1), else undefined. */
  known(identity: SourceIdentity): SourceSpectrum | undefined {
    return this.lru.get(this.keyOf(identity));
  }

  /**
   * The spectrum of a raster already in memory (the render path): L1 by identity, or this
   * raster's earlier analysis, or a new one now (stored in L1 and, in the background, in L2).
   */
  ofRaster(raster: PixelRaster, identity?: SourceIdentity): SourceSpectrum {
    const key = identity ? this.keyOf(identity) : undefined;
    const known = (key && this.lru.get(key)) || this.byRaster.get(raster);
    if (known) return known;
    const s = this.analyse(raster);
    this.remember(key, raster, s);
    if (key && identity && this.options.shared) {
      this.options.onShared?.(identity.key, key);
      this.options.shared.setValue(key, s).catch((e) => this.options.onSharedError?.(e));
    }
    return s;
  }

  /**
   * The spectrum of a source version: L1, then L2, else `produce` decodes the source and hands
   * its raster to `analyse` (it may hold a render slot meanwhile); once however many callers
   * ask at the same time.
   */
  async get(
    identity: SourceIdentity,
    produce: (analyse: (raster: PixelRaster) => SourceSpectrum) => Promise<SourceSpectrum>,
  ): Promise<{ spectrum: SourceSpectrum; from: SpectrumOrigin }> {
    const key = this.keyOf(identity);
    const hit = this.lru.get(key);
    if (hit) return { spectrum: hit, from: 'memory' };
    // A caller that joins a running analysis never runs the work: its `from` stays 'analysed'.
    let from: SpectrumOrigin = 'analysed';
    const { value } = await this.inflight.run(key, async () => {
      const stored = await this.options.shared?.getValue<SourceSpectrum>(key).catch(() => undefined);
      if (stored && stored.power instanceof Float32Array) {
        from = 'shared';
        this.remember(key, undefined, stored);
        return stored;
      }
      const s = await produce((raster) => {
        const made = this.analyse(raster);
        this.remember(undefined, raster, made);
        return made;
      });
      this.remember(key, undefined, s);
      if (this.options.shared) {
        this.options.onShared?.(identity.key, key);
        await this.options.shared.setValue(key, s).catch((e) => this.options.onSharedError?.(e));
      }
      return s;
    });
    return { spectrum: value, from };
  }
}

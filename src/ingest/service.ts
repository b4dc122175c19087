/**
 * The ingest service: turns an upload (or a source already in the folder origin) into a
 * manifest, analysing alias risk once and rendering every rendition into the cache with
 * bounded concurrency. Independent of Fastify, so the route and tests call it alike.
 */
import { EventEmitter } from 'node:events';
import type { Config } from '../config.js';
import { kernelNames } from '../core/index.js';
import { FoldwiseError } from '../errors.js';
import { sourceFormats } from '../codec/formats.js';
import type { Origin } from '../origins/types.js';
import { renderRendition, type RenderContext } from '../rendition/service.js';
import { decodeSource, ladderWish, type LoadedSource, loadSource, readSource } from '../rendition/source.js';
import { frameOf } from '../core/index.js';
import { StageClock } from '../rendition/timings.js';
import type { SpectrumStore } from '../risk/spectrum-store.js';
import type { IngestFormat } from '../schemas/ingest.js';
import { compileRenditionQuery } from '../schemas/rendition.js';
import { admitDecode, admitLadder } from './admit.js';
import { assessLadder } from '../risk/ladder.js';
import { mapBounded } from '../lib/bounded.js';
import { Gate } from '../lib/semaphore.js';
import { JobTable } from './jobs.js';
import { ladderFor } from './ladder.js';
import { assembleManifest, type Manifest, type ManifestRendition } from './manifest.js';
import { makePlaceholder } from './placeholder.js';
import { OnceByKey } from '../lib/once-by-key.js';
import { digestOf, keyFor, storeOnce } from './store.js';
import { renditionUrl } from './urls.js';
import { writeWarnings } from '../risk/warnings.js';

export interface IngestOptions {
  /** Widths to render; default the ladder capped at the source width. */
  widths?: readonly number[];
  /** Formats to render; default config.ingest.formats. */
  formats?: readonly IngestFormat[];
  /** Rendition parameters for every rung (prefilter, kernel, light), as a rendition URL spells them. */
  rendition?: Readonly<Record<string, string>>;
  /** The html's sizes attribute; default 100vw. */
  sizes?: string;
}

/** Prepared ingest work: `key` identifies the manifest; `compute` builds it. */
export interface IngestWork {
  key: string;
  compute: () => Promise<Manifest>;
  /** The stored source and options, for work handed to another replica (the job queue). */
  spec?: { source: string; options: IngestOptions };
}

/** One rendition the service made or found, for observers (metrics, tests). */
export interface RenditionEvent {
  source: string;
  width: number;
  format: IngestFormat;
  /** 'miss' when rendered now (or joined a render in flight), else 'hit-<tier>'. */
  cache: string;
  bytes: number;
}

export class IngestService extends EventEmitter {
  readonly jobs: JobTable<Manifest>;
  private readonly manifests: OnceByKey<Manifest>;
  /** Manifests built at once (each holds a decoded source while it renders). */
  private readonly gate: Gate;
  private readonly query;

  constructor(
    private readonly config: Config,
    private readonly render: RenderContext,
    private readonly spectra: SpectrumStore,
  ) {
    super();
    const { ingest, limits } = config;
    this.jobs = new JobTable<Manifest>(ingest.maxJobs);
    this.manifests = new OnceByKey<Manifest>(ingest.manifestCacheEntries);
    // The wait line holds at most maxJobs builds (sync calls and async jobs alike).
    this.gate = new Gate(ingest.concurrency, ingest.maxJobs, () =>
      new FoldwiseError('ERR_INGEST_JOBS_FULL', `${ingest.maxJobs} ingest builds are already waiting`, {
        headers: { 'retry-after': String(config.pool.retryAfterSeconds) },
      }),
    );
    this.query = compileRenditionQuery({ maxDimension: limits.maxDimension, kernelNames });
  }

  /** Forgets the finished manifests of a source (it was deleted). */
  forgetSource(sourceKey: string): void {
    this.manifests.forgetWhere((m) => m.source.key === sourceKey);
  }

  /** Whether the manifest for `key` is already made (a repeat answers at once). */
  isDone(key: string): boolean {
    return this.manifests.has(key);
  }

  /**
   * Runs (or joins, or reuses) the work; `reused` says no new work was started. `onStart` is
   * called when the work gets its build slot (or at once when it joins work in flight).
   */
  run(work: IngestWork, onStart?: () => void): { value: Promise<Manifest>; reused: boolean } {
    const flight = this.manifests.run(work.key, () =>
      this.gate.run(() => {
        onStart?.();
        return work.compute();
      }),
    );
    if (flight.reused) onStart?.();
    return flight;
  }

  /**
   * Uploaded bytes: refused when the origin is read-only. The work decodes them once: the
   * decode checks them (the rendition path's own limits) before they are stored under their
   * content key, and the same pixels serve every rung. `checkFirst` (the work may wait: an
   * async job, perhaps taken by another replica from the shared queue) checks and stores them
   * now, so bad bytes get their 4xx before any 202 and the waiting work names a stored source;
   * that check keeps no pixels, so waiting work holds bytes, not rasters.
   */
  async fromUpload(bytes: Buffer, options: IngestOptions, known?: string, checkFirst = false): Promise<IngestWork> {
    this.checkRendition(options);
    if (!this.config.ingest.writable) {
      throw new FoldwiseError('ERR_INGEST_READ_ONLY', 'uploads are switched off: the folder origin is read-only (ingest.writable)');
    }
    if (bytes.length === 0) throw new FoldwiseError('ERR_INGEST_EMPTY', 'the upload has no bytes');
    // `known`: the digest the caller already computed of these very bytes (the signing check).
    const digest = known ?? digestOf(bytes);
    const key = `upload:${digest}|${this.optionsKey(options)}`;
    if (checkFirst && !this.isDone(key)) {
      // Waiting work (an async job, perhaps on another replica's queue) names a stored source.
      const stored = await this.store(bytes, digest);
      return { key, spec: { source: stored, options }, compute: () => this.buildFrom(stored, options) };
    }
    return { key, compute: () => this.buildUpload(bytes, digest, options) };
  }

  /** A source already in the origin: identified now (404 here), read and decoded by `compute`. */
  async fromSource(path: string, options: IngestOptions): Promise<IngestWork> {
    this.checkRendition(options);
    const identity = await this.render.origin.identify(path);
    return {
      key: `source:${identity.key}@${identity.version}|${this.optionsKey(options)}`,
      compute: () => this.buildFrom(identity.key, options),
      spec: { source: identity.key, options },
    };
  }

  /** Work another replica prepared (a queued job): the source is already stored. */
  fromQueued(key: string, source: string, options: IngestOptions): IngestWork {
    return { key, compute: () => this.buildFrom(source, options), spec: { source, options } };
  }

  private optionsKey(options: IngestOptions): string {
    const extra = new URLSearchParams(options.rendition ?? {}).toString();
    const formats = (options.formats ?? this.config.ingest.formats).join(',');
    return `${options.widths?.join(',') ?? 'ladder'}|${formats}|${extra}|${options.sizes ?? ''}`;
  }

  /** Refuses, before any work, rendition parameters the rendition route would refuse (same codes). */
  checkRendition(options: IngestOptions): void {
    this.query.parse({ width: '1', ...options.rendition });
  }

  /** Decodes the uploaded bytes with the rendition path's own loader (same limits). */
  private decodeUpload(bytes: Buffer, digest: string): Promise<LoadedSource> {
    const identity = { key: `upload/${digest}`, version: digest };
    const upload: Origin = {
      name: 'upload',
      read: async () => ({ identity, bytes }),
      identify: async () => identity,
    };
    // Observed as the render path's `decode` stage (/metrics counts an upload's decodes).
    return loadSource(upload, identity.key, this.config.limits, new StageClock(this.render.observe), undefined, ladderWish);
  }

  /** Checks the bytes now (a decode within its own lease) and stores them; only the format is kept. */
  private async store(bytes: Buffer, digest: string): Promise<string> {
    const lease = await admitDecode(this.render.pool, bytes, this.config.limits);
    // The raster is unreachable before the lease ends (and collected then).
    const ext = await this.decodeUpload(bytes, digest)
      .then((loaded) => extensionOf(loaded.decoded.format))
      .finally(() => lease.release());
    const sourceKey = keyFor(digest, ext, { prefix: this.config.ingest.keyPrefix, digestChars: this.config.ingest.digestChars });
    await this.write(sourceKey, bytes);
    return sourceKey;
  }

  /** The upload's one decode, under the ladder's lease: checked, stored, then every rung rendered from it. */
  private async buildUpload(bytes: Buffer, digest: string, options: IngestOptions): Promise<Manifest> {
    const { limits, ingest } = this.config;
    const formats = options.formats ?? ingest.formats;
    const { lease, concurrency } = await admitLadder(this.render.pool, bytes, limits, { ...options, formats, concurrency: ingest.concurrency });
    try {
      const { decoded } = await this.decodeUpload(bytes, digest);
      const sourceKey = keyFor(digest, extensionOf(decoded.format), { prefix: ingest.keyPrefix, digestChars: ingest.digestChars });
      await this.write(sourceKey, bytes);
      // The stored file's identity (the cache keys' version), asked of the origin, not read back.
      const identity = await this.render.origin.identify(sourceKey);
      return await this.build(sourceKey, { identity, decoded }, options, concurrency);
    } finally {
      lease.release();
    }
  }

  /** Writes an upload's bytes under their content key: to the object store, or the folder. */
  private async write(sourceKey: string, bytes: Buffer): Promise<void> {
    const origin = this.render.origin;
    await (origin.write ? origin.write(sourceKey, bytes) : storeOnce(this.config.origin.sourceDir, sourceKey, bytes));
  }

  private async buildFrom(sourceKey: string, options: IngestOptions): Promise<Manifest> {
    // Read before admission, then the whole ladder is admitted as one job (admit.ts).
    const read = await readSource(this.render.origin, sourceKey, this.config.limits, new StageClock());
    const formats = options.formats ?? this.config.ingest.formats;
    const { limits, ingest } = this.config;
    const { lease, concurrency } = await admitLadder(this.render.pool, read.bytes, limits, { ...options, formats, concurrency: ingest.concurrency });
    try {
      return await this.build(sourceKey, await decodeSource(read, limits, new StageClock(), ladderWish), options, concurrency);
    } finally {
      lease.release();
    }
  }

  private async build(sourceKey: string, loaded: LoadedSource, options: IngestOptions, concurrency: number): Promise<Manifest> {
    const { identity, decoded } = loaded;
    // An animation's ladder and risk are those of its first frame; its renditions stay animated.
    const frames = decoded.animation?.frames ?? 1;
    const raster = frames > 1 ? frameOf(decoded.raster, frames, 0) : decoded.raster;
    const formats = options.formats ?? this.config.ingest.formats;
    const widths = ladderFor(raster.width, options.widths);
    const extra = options.rendition ?? {};
    const queryFor = (width: number, format: IngestFormat) => this.query.parse({ width: String(width), format, ...extra });
    // The render path's spectrum store: analysed once per source version, and the renders'
    // content-adaptive prefilter below finds it there by identity.
    const before = this.spectra.analyses;
    const spectrum = await this.spectra.ofRaster(raster, identity);
    if (this.spectra.analyses > before) this.emit('analysed', sourceKey);
    const steps = assessLadder(
      spectrum,
      widths.map((width) => ({ width, query: queryFor(width, formats[0]) })),
      this.config.limits,
    );
    const tasks = steps.flatMap((step) => formats.map((format) => ({ step, format })));
    const renditions = await mapBounded(tasks, concurrency, async ({ step, format }): Promise<ManifestRendition> => {
      // The source decoded above serves every miss of the ladder (no decode per rendition),
      // within the ladder's lease.
      const r = await renderRendition({ ...this.render, decoded: loaded, admitted: true }, sourceKey, queryFor(step.width, format));
      this.emit('rendition', { source: sourceKey, width: step.width, format, cache: r.cache, bytes: r.entry.body.length } satisfies RenditionEvent);
      return {
        url: renditionUrl(sourceKey, step.width, format, this.config.signing.keys[0], extra, this.config.server.publicUrl),
        width: step.width,
        height: step.height,
        format,
        bytes: r.entry.body.length,
        etag: r.entry.etag,
        risk: { level: step.level, score: step.score },
      };
    });
    const placeholder = await makePlaceholder(this.render, sourceKey, loaded, (raw) => this.query.parse(raw));
    const source = { key: sourceKey, width: raster.width, height: raster.height, ...(frames > 1 ? { frames } : {}) };
    return assembleManifest(source, formats, renditions, writeWarnings(steps), { sizes: options.sizes, placeholder, transparent: loaded.decoded.hasAlpha });
  }
}

/** The file extension a decoded format is stored under (the origin lists by extension). */
function extensionOf(format: string): string {
  const found = (sourceFormats[format] ?? (format === 'avif' ? sourceFormats.heif : undefined))?.extensions[0];
  if (!found) throw new FoldwiseError('ERR_SOURCE_UNSUPPORTED', `uploads of ${format} images are not accepted`);
  return found;
}

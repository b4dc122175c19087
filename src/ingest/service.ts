/**
 * The ingest service: turns an upload (or a source already in the folder origin) into a
 * manifest, analysing alias risk once and rendering every rendition into the cache with
 * bounded concurrency. Independent of Fastify, so the route and tests call it alike.
 */
import { EventEmitter } from 'node:events';
import type { Config } from '../config.js';
import { kernelNames } from '../core/index.js';
import { FoldwiseError } from '../errors.js';
import type { RenderContext } from '../rendition/service.js';
import { decodeSource, ladderWish, type LoadedSource, readSource } from '../rendition/source.js';
import { StageClock } from '../rendition/timings.js';
import type { SpectrumStore } from '../risk/spectrum-store.js';
import { compileRenditionQuery } from '../schemas/rendition.js';
import { admitDecode, admitLadder } from './admit.js';
import { Gate } from '../lib/semaphore.js';
import { JobTable } from './jobs.js';
import type { Manifest } from './manifest.js';
import { OnceByKey } from '../lib/once-by-key.js';
import { digestOf, keyFor, storeOnce } from './store.js';
import { buildManifest } from './build.js';
import { decodeUpload, extensionOf } from './upload-decode.js';
import type { IngestOptions, IngestWork } from './work.js';

export type { IngestOptions, IngestWork, RenditionEvent } from './work.js';

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


  /** Checks the bytes now (a decode within its own lease) and stores them; only the format is kept. */
  private async store(bytes: Buffer, digest: string): Promise<string> {
    const lease = await admitDecode(this.render.pool, bytes, this.config.limits);
    // The raster is unreachable before the lease ends (and collected then).
    const ext = await decodeUpload(this.render, this.config.limits, bytes, digest)
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
      const { decoded } = await decodeUpload(this.render, this.config.limits, bytes, digest);
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

  /** The manifest of a decoded source (build.ts), within the caller's lease. */
  private build(sourceKey: string, loaded: LoadedSource, options: IngestOptions, concurrency: number): Promise<Manifest> {
    return buildManifest({ config: this.config, render: this.render, spectra: this.spectra, query: this.query, events: this }, sourceKey, loaded, options, concurrency);
  }
}

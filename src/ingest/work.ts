import type { IngestFormat } from '../schemas/ingest.js';
import type { Manifest } from './manifest.js';

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

/** Which bytes a source is: the key names it, the version changes when its bytes do. */
export interface SourceIdentity {
  /** Path under the origin root, or the upstream URL. */
  key: string;
  /** size + mtime for files; ETag or Last-Modified for upstreams. */
  version: string;
}

export interface SourceBytes {
  identity: SourceIdentity;
  bytes: Buffer;
  contentType?: string;
}

export interface SourceListing {
  path: string;
  bytes: number;
  modified: string;
}

/** Where sources come from. Implementations refuse anything outside their root or allowlist. */
export interface Origin {
  readonly name: string;
  read(path: string, signal?: AbortSignal): Promise<SourceBytes>;
  identify(path: string, signal?: AbortSignal): Promise<SourceIdentity>;
  list?(): Promise<SourceListing[]>;
  /** Deletes a source; false when there was none. Origins that cannot delete leave it out. */
  remove?(path: string): Promise<boolean>;
  /** Stores bytes under a path unless the same size is there (content-addressed uploads); whether it wrote. */
  write?(path: string, bytes: Uint8Array): Promise<boolean>;
}

/**
 * Sources in an S3-compatible object store (AWS SDK for JavaScript v3), also where uploads
 * are written. A path is checked lexically (safeRelativePath) and becomes `<prefix>/<path>`.
 * The version for cache keys is the object's ETag and Last-Modified from HEAD. Sizes are
 * checked from Content-Length before the download and counted while the body streams. A
 * store that cannot be reached is a 502 with Retry-After, never a 500.
 */
import type { Readable } from 'node:stream';
import {
  DeleteObjectCommand,
  GetObjectCommand,
  HeadObjectCommand,
  ListObjectsV2Command,
  PutObjectCommand,
  S3Client,
} from '@aws-sdk/client-s3';
import { hasSourceExtension } from '../codec/formats.js';
import { FoldwiseError } from '../errors.js';
import { safeRelativePath } from './safe-path.js';
import type { Origin, SourceBytes, SourceIdentity, SourceListing } from './types.js';

export interface S3OriginOptions {
  /** s3://bucket/prefix */
  storeUrl: string;
  /** For S3-compatible servers; path-style addressing when set. */
  endpoint?: string | null;
  maxBytes: number;
  retryAfterSeconds: number;
  /** Most objects a listing shows. */
  maxListed?: number;
  /** Client settings for tests (credentials and region otherwise come from the SDK's environment). */
  client?: S3Client;
}

/** Bucket and key prefix of an s3:// URL ("" or "a/b/" for the prefix). */
export function parseStoreUrl(text: string): { bucket: string; prefix: string } {
  const m = /^s3:\/\/([a-z0-9][a-z0-9.-]{1,61}[a-z0-9])(\/.*)?$/.exec(text);
  if (!m) throw new RangeError(`store URL must be s3://bucket[/prefix], got ${text}`);
  const prefix = (m[2] ?? '').replace(/^\/+|\/+$/g, '');
  return { bucket: m[1], prefix: prefix ? `${prefix}/` : '' };
}

const statusOf = (e: unknown) => (e as { $metadata?: { httpStatusCode?: number } }).$metadata?.httpStatusCode;

export function createS3Origin(options: S3OriginOptions): Origin {
  const { bucket, prefix } = parseStoreUrl(options.storeUrl);
  const client =
    options.client ??
    new S3Client({
      ...(options.endpoint ? { endpoint: options.endpoint, forcePathStyle: true } : {}),
      // Checksums only where the API requires them: S3-compatible servers do not all know the newer ones.
      requestChecksumCalculation: 'WHEN_REQUIRED',
      responseChecksumValidation: 'WHEN_REQUIRED',
      maxAttempts: 2,
    });
  const retry = { 'retry-after': String(options.retryAfterSeconds) };

  const keyOf = (path: string) => ({ key: safeRelativePath(path).join('/'), object: `${prefix}${safeRelativePath(path).join('/')}` });
  /** The store's failures in our codes: missing is 404, the rest a 502 to retry later. */
  const failure = (key: string, e: unknown): FoldwiseError => {
    if (e instanceof FoldwiseError) return e;
    const status = statusOf(e);
    if (status === 404) return new FoldwiseError('ERR_SOURCE_NOT_FOUND', `No source "${key}".`, { cause: e });
    if (status === 403) return new FoldwiseError('ERR_STORE_FAILED', `the object store refused access to "${key}"`, { cause: e, headers: retry });
    return new FoldwiseError('ERR_STORE_FAILED', `the object store did not answer for "${key}"`, { cause: e, headers: retry });
  };
  const version = (etag: string | undefined, modified: Date | undefined) => `${etag ?? ''}|${modified?.getTime() ?? ''}`;
  const tooLarge = (n: number) => new FoldwiseError('ERR_SOURCE_TOO_LARGE', `The source has ${n} bytes; the limit is ${options.maxBytes}.`);

  async function readBody(body: Readable): Promise<Buffer> {
    const chunks: Buffer[] = [];
    let total = 0;
    for await (const chunk of body) {
      total += (chunk as Buffer).length;
      if (total > options.maxBytes) {
        body.destroy();
        throw tooLarge(total);
      }
      chunks.push(chunk as Buffer);
    }
    return Buffer.concat(chunks, total);
  }

  return {
    name: 's3',

    async identify(path: string, signal?: AbortSignal): Promise<SourceIdentity> {
      const { key, object } = keyOf(path);
      const head = await client.send(new HeadObjectCommand({ Bucket: bucket, Key: object }), { abortSignal: signal }).catch((e: unknown) => {
        throw failure(key, e);
      });
      return { key, version: version(head.ETag, head.LastModified) };
    },

    async read(path: string, signal?: AbortSignal): Promise<SourceBytes> {
      const { key, object } = keyOf(path);
      try {
        const got = await client.send(new GetObjectCommand({ Bucket: bucket, Key: object }), { abortSignal: signal });
        if (got.ContentLength !== undefined && got.ContentLength > options.maxBytes) {
          (got.Body as Readable | undefined)?.destroy();
          throw tooLarge(got.ContentLength);
        }
        const bytes = await readBody(got.Body as Readable);
        return { identity: { key, version: version(got.ETag, got.LastModified) }, bytes, contentType: got.ContentType };
      } catch (e) {
        throw failure(key, e);
      }
    },

    async list(): Promise<SourceListing[]> {
      const found: SourceListing[] = [];
      let token: string | undefined;
      do {
        const page = await client
          .send(new ListObjectsV2Command({ Bucket: bucket, Prefix: prefix, ContinuationToken: token }))
          .catch((e: unknown) => {
            throw failure(prefix || bucket, e);
          });
        for (const o of page.Contents ?? []) {
          const path = (o.Key ?? '').slice(prefix.length);
          if (!hasSourceExtension(path) || path.split('/').some((s) => s.startsWith('.'))) continue;
          found.push({ path, bytes: o.Size ?? 0, modified: (o.LastModified ?? new Date(0)).toISOString() });
        }
        token = page.IsTruncated ? page.NextContinuationToken : undefined;
      } while (token && found.length < (options.maxListed ?? 10_000));
      return found;
    },

    async remove(path: string): Promise<boolean> {
      const { key, object } = keyOf(path);
      const exists = await this.identify(path).then(
        () => true,
        (e: unknown) => {
          if (e instanceof FoldwiseError && e.code === 'ERR_SOURCE_NOT_FOUND') return false;
          throw e;
        },
      );
      await client.send(new DeleteObjectCommand({ Bucket: bucket, Key: object })).catch((e: unknown) => {
        throw failure(key, e);
      });
      return exists;
    },

    async write(path: string, bytes: Uint8Array): Promise<boolean> {
      const { key, object } = keyOf(path);
      const head = await client.send(new HeadObjectCommand({ Bucket: bucket, Key: object })).catch((e: unknown) => {
        if (statusOf(e) === 404) return undefined;
        throw new FoldwiseError('ERR_STORE_FAILED', `the object store did not answer for "${key}"`, { cause: e, headers: retry });
      });
      // Content-addressed: the same key and size is the same upload.
      if (head?.ContentLength === bytes.byteLength) return false;
      await client.send(new PutObjectCommand({ Bucket: bucket, Key: object, Body: bytes })).catch((e: unknown) => {
        // Any refusal of a write (no bucket, no permission, store down) is the store's failure.
        throw new FoldwiseError('ERR_STORE_FAILED', `the object store did not store "${key}"`, { cause: e, headers: retry });
      });
      return true;
    },
  };
}

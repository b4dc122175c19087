/**
 * Reading an upload body within its byte limit. The declared Content-Length is checked before
 * reading; a body without one (chunked) is counted as it arrives and cut off past the limit.
 */
import type { Readable } from 'node:stream';
import { FoldwiseError } from '../errors.js';

function tooLarge(limit: number): FoldwiseError {
  return new FoldwiseError('ERR_INGEST_TOO_LARGE', `the upload is larger than the limit of ${limit} bytes (limits.maxUploadBytes)`);
}

export function readUpload(body: Readable, declaredLength: string | undefined, limit: number): Promise<Buffer> {
  return new Promise((resolve, reject) => {
    if (declaredLength !== undefined && /^\d+$/.test(declaredLength) && Number(declaredLength) > limit) {
      // Refuse without reading; the rest drains unread so the 413 can still be sent.
      body.resume();
      reject(tooLarge(limit));
      return;
    }
    const chunks: Buffer[] = [];
    let total = 0;
    const onData = (chunk: Buffer): void => {
      total += chunk.length;
      if (total <= limit) {
        chunks.push(chunk);
        return;
      }
      body.off('data', onData).off('end', onEnd).off('error', onError);
      body.resume();
      chunks.length = 0;
      reject(tooLarge(limit));
    };
    const onEnd = (): void => resolve(Buffer.concat(chunks, total));
    const onError = (e: Error): void => reject(new FoldwiseError('ERR_REQUEST_INVALID', 'the upload was cut off', { cause: e }));
    // A client that goes away mid-upload closes the stream without 'end' (and maybe without
    // 'error'): settle then, so nothing waits forever. After 'end' this rejection is a no-op.
    const onClose = (): void => reject(new FoldwiseError('ERR_REQUEST_INVALID', 'the upload was cut off'));
    body.on('data', onData).once('end', onEnd).once('error', onError).once('close', onClose);
  });
}

/**
 * Whether a Prefer header (RFC 7240 section 2) carries the respond-async preference
 * (RFC 7240 section 4.1). Preferences are comma-separated; parameters follow ";".
 */
export function prefersAsync(prefer: string | string[] | undefined): boolean {
  const values = Array.isArray(prefer) ? prefer : prefer ? [prefer] : [];
  return values
    .flatMap((v) => v.split(','))
    .some((p) => p.split(';')[0].split('=')[0].trim().toLowerCase() === 'respond-async');
}

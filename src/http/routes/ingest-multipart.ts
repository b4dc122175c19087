/**
 * A multipart/form-data upload (RFC 7578), as CMSs send one: exactly one file part, plus form
 * fields from the upload's query vocabulary. Read by @fastify/multipart with its file limit set
 * to limits.maxUploadBytes, enforced while the file streams in.
 */
import type { FastifyRequest } from 'fastify';
import { FoldwiseError } from '../../errors.js';

export interface MultipartUpload {
  bytes: Buffer;
  /** Form fields by name (a repeated one as an array, which the query check refuses). */
  fields: Record<string, string | string[]>;
}

/** Limits of @fastify/multipart for an upload of at most `maxBytes`. */
export function multipartLimits(maxBytes: number) {
  // Two files are allowed through the parser so the second can be refused with our own code.
  return { fileSize: maxBytes, files: 2, fields: 16, fieldSize: 1024, parts: 24, headerPairs: 64 };
}

function tooLarge(limit: number): FoldwiseError {
  return new FoldwiseError('ERR_INGEST_TOO_LARGE', `the upload is larger than the limit of ${limit} bytes (limits.maxUploadBytes)`);
}

/** Maps the parser's own errors (by their stable codes) to ours. */
function ownError(e: unknown, limit: number): unknown {
  const code = (e as { code?: string }).code;
  if (code === 'FST_REQ_FILE_TOO_LARGE') return tooLarge(limit);
  if (code === 'FST_FIELDS_LIMIT' || code === 'FST_PARTS_LIMIT') return new FoldwiseError('ERR_INGEST_MULTIPART', 'too many form fields');
  if (code === 'FST_PROTO_VIOLATION') return new FoldwiseError('ERR_INGEST_MULTIPART', 'a form field name is not allowed');
  if (code === 'FST_MP_PREMATURE_CLOSE') return new FoldwiseError('ERR_REQUEST_INVALID', 'the upload was cut off', { cause: e });
  return e;
}

/** Reads the one file and the fields; refuses two files or none (ERR_INGEST_MULTIPART). */
export async function readMultipart(request: FastifyRequest, limit: number): Promise<MultipartUpload> {
  const declared = request.headers['content-length'];
  // The body holds the file plus boundaries and part headers; far past the limit is refused unread.
  if (declared !== undefined && /^\d+$/.test(declared) && Number(declared) > limit + 64 * 1024) throw tooLarge(limit);
  let bytes: Buffer | undefined;
  const fields: Record<string, string | string[]> = {};
  try {
    for await (const part of request.parts()) {
      if (part.type === 'file') {
        if (bytes) throw new FoldwiseError('ERR_INGEST_MULTIPART', 'the form carries more than one file: send one picture per upload');
        bytes = await part.toBuffer();
        continue;
      }
      const value = typeof part.value === 'string' ? part.value : String(part.value);
      const before = fields[part.fieldname];
      fields[part.fieldname] = before === undefined ? value : [...[before].flat(), value];
    }
  } catch (e) {
    throw ownError(e, limit);
  }
  if (!bytes) throw new FoldwiseError('ERR_INGEST_MULTIPART', 'the form carries no file: add one file field with the picture');
  return { bytes, fields };
}

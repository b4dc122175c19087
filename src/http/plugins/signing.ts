import type { FastifyInstance, FastifyReply, FastifyRequest } from 'fastify';
import fp from 'fastify-plugin';
import { FoldwiseError } from '../../errors.js';
import { verifySignature } from '../../security/signing.js';

/** Signed-URL checking for the endpoints whose URLs name a rendition. */
export interface SigningOptions {
  /** HMAC keys; every one verifies (rotation). */
  keys: string[];
  /** Refuse unsigned requests (403). With keys and not required, signatures are optional. */
  required: boolean;
  /**
   * Route patterns (as registered) whose requests are checked, matched by prefix, e.g.
   * ["/v1/renditions/", "/v1/alias-risk/"]. Matching the route rather than the raw path
   * means a percent-encoded spelling of the path cannot reach the route unchecked.
   */
  prefixes: string[];
  /** max-age for answers to signed URLs, which are marked immutable. */
  signedMaxAgeSeconds: number;
}

declare module 'fastify' {
  interface FastifyRequest {
    /** True when the URL carried a valid signature. */
    signed: boolean;
  }
}

/**
 * The one rule for whether unsigned requests are refused: `signing.required` when set, else
 * required whenever a key is configured.
 */
export function signingRequired(signing: { keys: readonly string[]; required?: boolean }): boolean {
  return signing.required ?? signing.keys.length > 0;
}

function splitUrl(url: string): { path: string; query: URLSearchParams } {
  const q = url.indexOf('?');
  return q < 0 ? { path: url, query: new URLSearchParams() } : { path: url.slice(0, q), query: new URLSearchParams(url.slice(q + 1)) };
}

/**
 * The one signature check of a raw request URL: true when validly signed; a present but wrong
 * signature is refused even when signing is optional; a missing one only when `required`.
 * `unsignedDetail` is the 403 detail for a missing signature.
 */
export function checkSignedUrl(url: string, keys: string[], required: boolean, unsignedDetail: string): boolean {
  const { path, query } = splitUrl(url);
  const check = verifySignature(path, query, keys);
  if (check === 'invalid') throw new FoldwiseError('ERR_SIGNATURE_INVALID', 'The signature does not match this path and query.');
  if (check === 'missing' && required) throw new FoldwiseError('ERR_SIGNATURE_REQUIRED', unsignedDetail);
  return check === 'valid';
}

/**
 * Checks signatures on the raw URL before anything else looks at the request (onRequest), so
 * an unsigned request costs one HMAC and never reaches parsing, the cache or the renderer.
 * A signature that is present but wrong is refused even when signing is optional. Successful
 * answers to signed URLs get `Cache-Control: public, max-age=<signedMaxAgeSeconds>, immutable`:
 * the URL names exact bytes, and nobody but the key holder can mint another.
 */
async function signingPlugin(app: FastifyInstance, options: SigningOptions): Promise<void> {
  if (options.required && options.keys.length === 0) {
    throw new RangeError('signing is required but no signing key is configured');
  }
  const cacheControl = `public, max-age=${options.signedMaxAgeSeconds}, immutable`;
  const applies = (path: string): boolean => options.prefixes.some((p) => path.startsWith(p));
  app.decorateRequest('signed', false);
  // No key: nothing can be signed, so every request is spared both hooks.
  if (options.keys.length === 0) return;

  app.addHook('onRequest', async (request: FastifyRequest) => {
    if (!applies(request.routeOptions.url ?? '')) return;
    request.signed = checkSignedUrl(
      request.url,
      options.keys,
      options.required,
      'This endpoint needs a signed URL (parameter "signature").',
    );
  });

  app.addHook('onSend', async (request: FastifyRequest, reply: FastifyReply, payload) => {
    if (request.signed && (reply.statusCode === 200 || reply.statusCode === 304)) {
      reply.header('cache-control', cacheControl);
    }
    return payload;
  });
}

export default fp(signingPlugin, { name: 'foldwise-signing', fastify: '5.x' });

import type { FastifyInstance, FastifyReply, FastifyRequest } from 'fastify';
import fp from 'fastify-plugin';
import { checkSignedUrl } from '../../security/signing.js';

/** Signed-URL checking for the endpoints whose URLs name a rendition. */
export interface SigningOptions {
  /** HMAC keys; every one verifies (rotation). */
  keys: string[];
  /** Refuse unsigned requests (403). With keys and not required, signatures are optional. */
  required: boolean;
  /** max-age for answers to signed URLs, which are marked immutable. */
  signedMaxAgeSeconds: number;
}

declare module 'fastify' {
  interface FastifyContextConfig {
    /**
     * The route's URLs carry signatures, checked by this plugin's one hook. Reading the matched
     * route's config rather than the raw path means a percent-encoded spelling of the path
     * cannot reach the route unchecked.
     */
    signed?: boolean;
  }
  interface FastifyRequest {
    /** True when the URL carried a valid signature. */
    signed: boolean;
  }
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
  app.decorateRequest('signed', false);
  // No key: nothing can be signed, so every request is spared both hooks.
  if (options.keys.length === 0) return;

  app.addHook('onRequest', async (request: FastifyRequest) => {
    if (request.routeOptions.config?.signed !== true) return;
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

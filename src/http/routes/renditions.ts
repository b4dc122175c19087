import type { FastifyInstance, FastifyReply, FastifyRequest } from 'fastify';
import { kernelNames } from '../../core/index.js';
import { renderRendition } from '../../rendition/service.js';
import { serverTiming } from '../../rendition/timings.js';
import { epochNow, tracing } from '../../pool/trace.js';
import { problemResponses, queryParameters } from '../../schemas/openapi.js';
import { compileRenditionQuery } from '../../schemas/rendition.js';
import { abandonSignal } from './abandon.js';
import { matchesIfNoneMatch } from './conditional.js';
import { renditionsPrefix } from '../../schemas/paths.js';
import { isWarmUp } from '../warm-up-token.js';
import { renditionUrlReader } from './rendition-url.js';
import { acceptCh, hintedVary, isHinted, resolveHinted } from './hints.js';

/**
 * GET (and HEAD) /v1/renditions/{source}: validates the query, checks the signature when
 * signing is on, renders or answers from cache, and speaks HTTP caching (strong ETag, 304,
 * Cache-Control, Vary) with Server-Timing and Rendition-Plan.
 */
export default async function renditionRoutes(app: FastifyInstance): Promise<void> {
  const { config, renderContext } = app;
  const query = compileRenditionQuery({ maxDimension: config.limits.maxDimension, kernelNames });
  const requests = renditionUrlReader(renditionsPrefix, query.parse);
  const plainCache = `public, max-age=${config.http.maxAgeSeconds}`;

  async function handler(request: FastifyRequest, reply: FastifyReply) {
    const arrived = tracing ? epochNow() : 0;
    const loop = tracing ? performance.eventLoopUtilization() : undefined;
    const raw = request.query as Record<string, unknown>;
    // width=hinted: the width comes from Client Hints (hints.ts); the memo keys on URL and width.
    const hinted = isHinted(raw) ? resolveHinted(raw, request.headers, config.limits.maxDimension) : undefined;
    const { path, query: q, canonical } = hinted
      ? requests.read(request.url, hinted.raw, `${request.url}\n${hinted.width}`)
      : requests.read(request.url, raw);
    const signal = abandonSignal(reply);
    // The warm-up's own requests (warm-path.ts) stay out of the stage metrics, as out of the request metrics.
    const observe = isWarmUp(request.headers) ? undefined : renderContext.observe;
    const r = await renderRendition({ ...renderContext, observe, signal, shedding: request.shedding, answerFirst: true }, path, q, request.headers.accept, canonical);
    reply
      .header('etag', r.entry.etag)
      // For validly signed URLs the signing plugin (src/http/plugins/signing.ts), which checked the
      // signature before parsing, replaces this with a year and immutable.
      .header('cache-control', plainCache)
      .header('server-timing', serverTiming(r.cache, r.timings));
    // FOLDWISE_TIMELINE=1 only (src/pool/trace.ts): the render's spans, for scripts/bench/timeline.ts.
    if (tracing) reply.header('rendition-timeline', JSON.stringify({ arrived, answered: epochNow(), mainActiveMs: performance.eventLoopUtilization(loop).active, marks: r.marks }));
    const vary = [hinted ? hintedVary : '', q.format === undefined ? 'Accept' : ''].filter(Boolean).join(', ');
    if (vary) reply.header('vary', vary);
    reply.header('accept-ch', acceptCh);
    if (hinted) reply.header('rendition-width', `${hinted.width};from=${hinted.from}`);
    for (const [k, v] of Object.entries(r.entry.headers)) reply.header(k, v);
    if (matchesIfNoneMatch(request.headers['if-none-match'], r.entry.etag)) return reply.code(304).send();
    return reply.type(r.entry.contentType).header('content-length', r.entry.body.length).send(r.entry.body);
  }

  app.get(
    `${renditionsPrefix}*`,
    {
      config: {
        signed: true,
        openapi: {
          summary: 'A rendition of a source',
          description:
            'Renders (or answers from cache) the source at {source} under the origin root. Unknown, repeated or out-of-range parameters are refused with 400 so junk queries cannot bust the cache.',
          tags: ['renditions'],
          parameters: [
            { name: 'source', in: 'path', required: true, description: 'Path under the origin root.', schema: { type: 'string' } },
            ...queryParameters(query.schema),
            {
              name: 'slot',
              in: 'query',
              required: false,
              description:
                'With width=hinted (required then): the picture\'s width in CSS px, as its sizes says. The width is Sec-CH-Width when sent, else slot x Sec-CH-DPR, else slot x density; a width from a header is rounded up to a fixed ladder of widths 10 % apart. The answer sends Vary: Sec-CH-Width, Sec-CH-DPR and Rendition-Width: <px>;from=<sec-ch-width|sec-ch-dpr|fallback>.',
              schema: { type: 'integer', minimum: 1 },
            },
            { name: 'Sec-CH-Width', in: 'header', required: false, description: 'Client Hint (width=hinted): layout width in device px.', schema: { type: 'integer' } },
            { name: 'Sec-CH-DPR', in: 'header', required: false, description: 'Client Hint (width=hinted): device pixel ratio.', schema: { type: 'number' } },
          ],
          responses: {
            '200': {
              description:
                'The rendition. Headers: ETag, Cache-Control, Vary (Accept when format is absent; Sec-CH-Width, Sec-CH-DPR with width=hinted), Accept-CH, Server-Timing, Rendition-Plan, Rendition-Clamped (when the enlargement cap shrank it), Rendition-Width (width=hinted).',
              content: { 'image/avif': {}, 'image/webp': {}, 'image/jpeg': {}, 'image/png': {} },
            },
            '304': { description: 'Not modified (If-None-Match matched the ETag).' },
            ...problemResponses(400, 403, 404, 413, 415, 422, 500, 503),
          },
        },
      },
    },
    handler,
  );
}

import type { FastifyInstance, FastifyReply, FastifyRequest } from 'fastify';
import { formatPlanHeader, kernelNames } from '../../core/index.js';
import { strongEtag } from '../../rendition/key.js';
import { serverTiming } from '../../rendition/timings.js';
import { assessSource, riskAnswer } from '../../risk/service.js';
import { compileAliasRiskQuery } from '../../schemas/alias-risk.js';
import { jsonBody, problemResponses, queryParameters } from '../../schemas/openapi.js';
import { riskReportSchema } from '../../schemas/risk-report.js';
import { aliasRiskPrefix } from '../../schemas/paths.js';
import { matchesIfNoneMatch } from './conditional.js';
import { sourcePathOf } from './path.js';

/**
 * GET /v1/alias-risk/{source}: the alias risk of the rendition the same query would produce,
 * from the source's spectrum (src/risk/service.ts), as JSON or as a picture (view=map,
 * view=spectrum).
 */
export default async function aliasRiskRoutes(app: FastifyInstance): Promise<void> {
  const { config } = app;
  const risk = { render: app.renderContext, spectra: app.spectra };
  const query = compileAliasRiskQuery({ maxDimension: config.limits.maxDimension, kernelNames });
  const plainCache = `public, max-age=${config.http.maxAgeSeconds}`;

  async function handler(request: FastifyRequest, reply: FastifyReply) {
    const path = sourcePathOf(request.url, aliasRiskPrefix);
    const q = query.parse(request.query as Record<string, unknown>);
    const a = await assessSource(risk, path, q);
    const { body, type } = await riskAnswer(risk, a, q.view);
    const etag = strongEtag(body);
    reply
      .type(type)
      .header('etag', etag)
      // Signed URLs: the signing plugin makes this a year and immutable.
      .header('cache-control', plainCache)
      .header('rendition-plan', formatPlanHeader(a.assessed.plan))
      .header(
        'server-timing',
        `${serverTiming(`spectrum-${a.from}`, a.clock.timings)}, analyze;dur=${a.analyseMs.toFixed(2)}, assess;dur=${a.assessMs.toFixed(2)}`,
      );
    if (matchesIfNoneMatch(request.headers['if-none-match'], etag)) return reply.code(304).send();
    return reply.header('content-length', body.length).send(body);
  }

  app.get(
    `${aliasRiskPrefix}*`,
    {
      config: {
        signed: true,
        openapi: {
          summary: 'The alias risk of a rendition, before it is rendered',
          description:
            'Takes the rendition parameters of /v1/renditions/{source} plus view. Answers, for the rendition that the same query would produce, what a viewer would see: every false pattern (kind fold, beat or clean; its source frequency and the apparent frequency where it shows; its Michelson contrast in linear light; the Mannos & Sakrison (1974) contrast threshold at the CSS reference pixel divided by density; margin = contrast / threshold, 1.0 = just visible), the largest margin, level (low: nothing a viewer will see, margin under 1; moderate: faint, on close inspection, margin 1 to 3; high: plainly visible, 3 or more), the viewing geometry, the per-axis cut-off prefilter=auto chose, advice with what it costs the picture, and grid.margins (threshold units per region, the map). Also source and target size, scale and new Nyquist frequency per axis, the plan, and for tools the energy view: folded fractions, peaks beyond the new Nyquist with their alias frequencies, per-region folded energy and a Gaussian sigma. view=map draws grid.margins over the picture, view=spectrum the source spectrum (PNG).',
          tags: ['alias-risk'],
          parameters: [
            { name: 'source', in: 'path', required: true, description: 'Path under the origin root.', schema: { type: 'string' } },
            ...queryParameters(query.schema),
          ],
          responses: {
            '200': {
              description: 'The report (JSON) or picture (PNG). Headers: ETag, Cache-Control, Server-Timing, Rendition-Plan.',
              content: {
                'application/json': (jsonBody('', riskReportSchema) as { content: Record<string, unknown> }).content['application/json'],
                'image/png': {},
              },
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

import type { FastifyInstance, FastifyReply, FastifyRequest } from 'fastify';
import { formatPlanHeader, kernelNames } from '../../core/index.js';
import { strongEtag } from '../../rendition/key.js';
import { checkRequestedSize } from '../../rendition/plan.js';
import { renderRendition } from '../../rendition/service.js';
import { readHeader } from '../../codec/header.js';
import { decodeCost } from '../../pool/cost.js';
import { decodeLimits, decodeSource, readSource } from '../../rendition/source.js';
import { serverTiming, StageClock } from '../../rendition/timings.js';
import { decodeRgb, encodePng, riskMap, spectrumPicture } from '../../risk/pictures/index.js';
import { planResponseOf } from '../../risk/adaptive.js';
import { assessRendition, riskBody } from '../../risk/report.js';
import { compileAliasRiskQuery } from '../../schemas/alias-risk.js';
import { jsonBody, problemResponses, queryParameters } from '../../schemas/openapi.js';
import { riskReportSchema } from '../../schemas/risk-report.js';
import { aliasRiskPrefix } from '../../schemas/paths.js';
import { compileRenditionQuery } from '../../schemas/rendition.js';
import { matchesIfNoneMatch } from './conditional.js';
import { sourcePathOf } from './path.js';

/** Width of the source preview under view=map (output px): enough to read a 8 x 6 grid. */
const MAP_WIDTH = 640;

/**
 * GET /v1/alias-risk/{source}: the alias risk of the rendition the same query would produce,
 * from the source's spectrum (analysed once per source version, src/risk/spectrum-store.ts), as JSON
 * or as a picture (view=map, view=spectrum).
 */
export default async function aliasRiskRoutes(app: FastifyInstance): Promise<void> {
  const { config, renderContext: ctx, spectra } = app;
  const options = { maxDimension: config.limits.maxDimension, kernelNames };
  const query = compileAliasRiskQuery(options);
  const previewQuery = compileRenditionQuery(options);
  const plainCache = `public, max-age=${config.http.maxAgeSeconds}`;

  async function handler(request: FastifyRequest, reply: FastifyReply) {
    const path = sourcePathOf(request.url, aliasRiskPrefix);
    const q = query.parse(request.query as Record<string, unknown>);
    checkRequestedSize(q, ctx.limits);
    const clock = new StageClock(ctx.observe);
    const identity = await clock.time('origin', () => ctx.identities?.identify(path) ?? ctx.origin.identify(path));
    let analyseMs = 0;
    const { spectrum, from } = await spectra.get(identity, async (analyse) => {
      // Read before admission; admitted for the decode and as much again for the analysis (an allowance).
      const read = await readSource(ctx.origin, path, ctx.limits, clock);
      const header = await readHeader(read.bytes, decodeLimits(ctx.limits));
      const lease = await ctx.pool.admit(2 * decodeCost(header), `analysing a ${header.width}x${header.height} source`);
      try {
        // The source's own gamut (luminance with its primaries' coefficients); an animation's first frame.
        const { decoded } = await decodeSource(read, ctx.limits, clock, { gamut: 'source', frames: 0 });
        const start = performance.now();
        const s = analyse(decoded.raster);
        analyseMs = performance.now() - start;
        return s;
      } finally {
        lease.release();
      }
    });
    const start = performance.now();
    const assessed = assessRendition(spectrum, q, ctx.limits);
    const assessMs = performance.now() - start;

    let body: Buffer;
    if (q.view === 'json') {
      body = Buffer.from(JSON.stringify(riskBody(path, spectrum, assessed)));
      reply.type('application/json; charset=utf-8');
    } else if (q.view === 'spectrum') {
      body = await encodePng(spectrumPicture(spectrum, assessed.report, planResponseOf(assessed.plan)));
      reply.type('image/png');
    } else {
      const width = String(Math.min(MAP_WIDTH, spectrum.width));
      const preview = await renderRendition(ctx, path, previewQuery.parse({ width, format: 'jpeg' }));
      const picture = riskMap(await decodeRgb(preview.entry.body), assessed.report, spectrum, assessed.plan.crop);
      body = await encodePng(picture);
      reply.type('image/png');
    }
    const etag = strongEtag(body);
    reply
      .header('etag', etag)
      // Signed URLs: the signing plugin makes this a year and immutable.
      .header('cache-control', plainCache)
      .header('rendition-plan', formatPlanHeader(assessed.plan))
      .header(
        'server-timing',
        `${serverTiming(`spectrum-${from}`, clock.timings)}, analyze;dur=${analyseMs.toFixed(2)}, assess;dur=${assessMs.toFixed(2)}`,
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

import { z } from 'zod';
import { parseQuery, type RawQuery } from './query.js';
import { compileRenditionQuery, renditionQueryShape, type RenditionQuery, type RenditionQueryOptions } from './rendition.js';

export const riskViews = ['json', 'map', 'spectrum'] as const;
export type RiskView = (typeof riskViews)[number];

const viewShape = {
  view: z
    .enum(riskViews, { error: `view must be one of ${riskViews.join(', ')}` })
    .default('json')
    .meta({
      description:
        'json: the report; map: PNG of the source with the region risk as a heat map; spectrum: PNG of the log power spectrum with the new Nyquist and the planned cutoff.',
    }),
};

export type AliasRiskQuery = RenditionQuery & { view: RiskView };

/**
 * Compiles the alias-risk query once (at registration): every rendition parameter, validated
 * exactly as /v1/renditions does (the same rendition is meant), plus `view`.
 */
export function compileAliasRiskQuery(o: RenditionQueryOptions) {
  const rendition = compileRenditionQuery(o);
  const view = z.strictObject(viewShape);
  return {
    /** The whole query, for the OpenAPI document. */
    schema: z.strictObject({ ...renditionQueryShape(o), ...viewShape }),
    parse(raw: RawQuery): AliasRiskQuery {
      const { view: given, ...rest } = raw;
      const v = parseQuery(view, given === undefined ? {} : { view: given });
      return { ...rendition.parse(rest), view: v.view };
    },
  };
}

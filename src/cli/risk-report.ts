/**
 * One alias-risk report for the command line, computed the way the ingest ladder computes
 * each of its widths: the source decoded with the service's limits, its spectrum from the
 * service's store, the render service's plan (adaptive prefilter included) assessed against it.
 */
import { formatPlanHeader } from '../core/index.js';
import { assessLadder } from '../ingest/assess.js';
import { writeWarnings } from '../ingest/warnings.js';
import { loadSource } from '../render/source.js';
import { StageClock } from '../render/timings.js';
import type { CommandApp } from './app.js';
import { parseRenditionQuery } from './rendition-flags.js';
import type { RiskView } from './risk-table.js';

export async function assessOne({ app, config }: CommandApp, path: string, raw: Record<string, string>): Promise<RiskView> {
  const query = await parseRenditionQuery(config, raw);
  const { decoded, identity } = await loadSource(app.origin, path, config.limits, new StageClock());
  const { raster } = decoded;
  const spectrum = app.spectra.ofRaster(raster, identity);
  const steps = assessLadder(raster, spectrum, [{ width: query.width ?? 0, query }], config.limits, app.renderContext.adaptiveSigma, identity);
  const step = steps[0];
  return {
    file: path,
    source: { width: raster.width, height: raster.height },
    target: { width: step.plan.targetWidth, height: step.plan.targetHeight },
    plan: formatPlanHeader(step.plan),
    report: step.report,
    warnings: writeWarnings([{ ...step, width: step.plan.targetWidth }]),
  };
}

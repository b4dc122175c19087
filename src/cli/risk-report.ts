/**
 * One alias-risk report for the command line, from the risk service the API's route calls
 * (src/risk/service.ts) on the in-process app, so the JSON, the numbers and the heat map are
 * exactly the API's.
 */
import { writeFile } from 'node:fs/promises';
import { kernelNames } from '../core/index.js';
import type { RiskReport } from '../core/risk/index.js';
import { widthRisk } from '../risk/ladder.js';
import { writeWarnings } from '../risk/warnings.js';
import type { riskBody } from '../risk/report.js';
import { assessSource, riskAnswer } from '../risk/service.js';
import { compileAliasRiskQuery } from '../schemas/alias-risk.js';
import { asUsage, type CommandApp } from './app.js';
import type { RiskView } from './risk-table.js';

export type RiskBody = ReturnType<typeof riskBody>;

/** The report of `path` for the rendition query `raw`; with `mapFile`, the heat map too. */
export async function fetchRisk({ app, config }: CommandApp, path: string, raw: Record<string, string>, mapFile?: string): Promise<RiskBody> {
  const risk = { render: app.renderContext, spectra: app.spectra };
  try {
    const q = compileAliasRiskQuery({ maxDimension: config.limits.maxDimension, kernelNames }).parse(raw);
    const assessed = await assessSource(risk, path, q);
    // The API's JSON itself (parsed back), so the command prints exactly what the route sends.
    const body = JSON.parse((await riskAnswer(risk, assessed, 'json')).body.toString('utf8')) as RiskBody;
    if (mapFile) await writeFile(mapFile, (await riskAnswer(risk, assessed, 'map')).body);
    return body;
  } catch (e) {
    // A refused parameter is the command line's fault (exit 2); anything else is a failure.
    throw asUsage(e);
  }
}

/** The table's view of an API answer, with the ingest hook's warning sentence for it. */
export function riskView(body: RiskBody): RiskView {
  const report: RiskReport = {
    nyquist: body.nyquist,
    scale: body.scale,
    folded: body.folded,
    score: body.score,
    level: body.level,
    patterns: body.patterns,
    margin: body.margin,
    viewing: body.viewing,
    cutoff: body.cutoff,
    advice: body.advice,
    peaks: body.peaks,
    grid: body.grid,
    recommendedSigma: body.recommendedSigma,
    reason: body.reason,
  };
  return {
    file: body.source.path,
    source: { width: body.source.width, height: body.source.height },
    target: body.target,
    plan: body.plan.header,
    report,
    warnings: writeWarnings([widthRisk(body.target.width, report)]),
  };
}

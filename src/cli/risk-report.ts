/**
 * One alias-risk report for the command line: GET /v1/alias-risk/{source} on the in-process
 * app, so the JSON, the numbers and the heat map are exactly the API's.
 */
import { writeFile } from 'node:fs/promises';
import type { RiskReport } from '../core/risk/index.js';
import { type ErrorCode, FoldwiseError } from '../errors.js';
import { widthRisk } from '../risk/ladder.js';
import { writeWarnings } from '../risk/warnings.js';
import { aliasRiskPrefix } from '../schemas/paths.js';
import type { riskBody } from '../risk/report.js';
import type { CommandApp } from './app.js';
import { UsageError } from './exit.js';
import type { RiskView } from './risk-table.js';

export type RiskBody = ReturnType<typeof riskBody>;

async function get(app: CommandApp['app'], url: string) {
  const res = await app.inject({ method: 'GET', url });
  if (res.statusCode === 200) return res;
  const problem = res.json() as { code: ErrorCode; detail: string };
  // A refused parameter is the command line's fault (exit 2); anything else is a failure.
  if (problem.code.startsWith('ERR_PARAM_')) throw new UsageError(problem.detail);
  throw new FoldwiseError(problem.code, problem.detail);
}

/** The report of `path` for the rendition query `raw`; with `mapFile`, the heat map too. */
export async function fetchRisk({ app }: CommandApp, path: string, raw: Record<string, string>, mapFile?: string): Promise<RiskBody> {
  const url = `${aliasRiskPrefix}${encodeURIComponent(path)}?${new URLSearchParams(raw)}`;
  const body = (await get(app, url)).json() as RiskBody;
  if (mapFile) await writeFile(mapFile, (await get(app, `${url}&view=map`)).rawPayload);
  return body;
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

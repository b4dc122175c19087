import { createHash } from 'node:crypto';
import { readFile, utimes } from 'node:fs/promises';
import { join } from 'node:path';
import { ensureDemoImages } from '../../tools/demo/index.js';
import { build, type TestApp } from '../helpers/build.js';
import { type GoldenRequest, goldenRequests } from './requests.js';

/** What the harness keeps of one response: no dates, timings or request ids. */
export interface Recorded {
  status: number;
  headers: Record<string, string>;
  /** sha-256 of the body, hex; absent when the body is a live figure. */
  sha256?: string;
}

/** Headers whose values a caller or a cache sees and that do not change from run to run. */
export const keptHeaders = ['content-type', 'etag', 'vary', 'cache-control', 'rendition-plan', 'content-length'] as const;

/** The folder origin identifies a file by size and mtime: one fixed mtime makes ETags repeatable. */
const FIXED_MTIME = new Date('2026-01-01T00:00:00Z');

/** The app the tests build (test/helpers/build.ts) over freshly generated demo pictures. */
export async function buildGoldenApp(): Promise<TestApp> {
  const t = await build({ config: { pool: { threads: 2, maxQueue: 64 } } });
  for (const path of await ensureDemoImages(t.sourceDir)) await utimes(join(t.sourceDir, path), FIXED_MTIME, FIXED_MTIME);
  return t;
}

/** Sends one request of the set (in order: `etags` holds the ETags answered so far). */
export async function send(t: TestApp, r: GoldenRequest, index: number, etags: Map<string, string>): Promise<Recorded> {
  // A fixed request id: problem bodies carry it.
  const headers: Record<string, string> = { 'x-request-id': `golden-${index}`, ...r.headers };
  let payload: string | Buffer | undefined;
  if (r.body && 'json' in r.body) {
    payload = typeof r.body.json === 'string' ? r.body.json : JSON.stringify(r.body.json);
    headers['content-type'] ??= 'application/json';
  } else if (r.body) {
    payload = await readFile(join(t.sourceDir, r.body.file));
  }
  if (r.ifNoneMatchOf) headers['if-none-match'] = etags.get(r.ifNoneMatchOf) ?? '"none"';
  const res = await t.app.inject({ method: r.method, url: r.url, headers, payload });
  const kept: Record<string, string> = {};
  for (const name of r.volatileBody ? ['content-type'] : keptHeaders) {
    const value = res.headers[name];
    if (value !== undefined) kept[name] = String(value);
  }
  if (kept.etag) etags.set(r.name, kept.etag);
  const out: Recorded = { status: res.statusCode, headers: kept };
  if (!r.volatileBody) out.sha256 = createHash('sha256').update(res.rawPayload).digest('hex');
  return out;
}

/** Builds the app, sends the whole set in order and returns every response by request name. */
export async function replayAll(): Promise<Record<string, Recorded>> {
  const t = await buildGoldenApp();
  try {
    const etags = new Map<string, string>();
    const out: Record<string, Recorded> = {};
    const requests = goldenRequests();
    for (const [i, r] of requests.entries()) out[r.name] = await send(t, r, i, etags);
    return out;
  } finally {
    await t.close();
  }
}

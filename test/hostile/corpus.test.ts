/**
 * The hostile-input corpus: every case must get its 4xx (or 5xx) as RFC 9457 problem details
 * with our stable code, leave the cache exactly as it was, and leave the service serving a
 * correct rendition. Memory is measured before and after the whole corpus and printed.
 */
import { readdir, symlink, writeFile } from 'node:fs/promises';
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { build, type TestApp } from '../helpers/build.js';
import { at, pixels, writePng } from '../helpers/images.js';
import { memoryEntries } from '../security/cache-probe.js';
import { settledMemory } from './memory.js';
import { parameterCases, traversalCases, type RequestCase } from './requests.js';
import { hostileSources, type SourceCase } from './sources.js';

let t: TestApp;
let port = 0;
let probe: http.Server;
let probeHits = 0;
let sources: SourceCase[] = [];
let baseline: { rss: number; heap: number };

/** Entries in the memory tier plus files in the disk tier: what "cached" means here. */
async function cachedCount(): Promise<number> {
  // Renditions are answered before their disk files are written (renderRendition's answerFirst): count once written.
  await t.app.renditionCache.cache.settled();
  const files = await readdir(t.cacheDir, { recursive: true }).catch(() => []);
  return memoryEntries(t.app) + files.length;
}

/** A flat mid-grey source: any correct downscale of a flat field is the same flat field. */
const control = '/v1/renditions/control.png?width=16&format=png';

async function expectControl(): Promise<void> {
  const res = await t.app.inject({ url: control });
  expect(res.statusCode).toBe(200);
  const img = await pixels(res.rawPayload);
  // Flat fields are preserved exactly by a normalised resampler (common practice; CHECKS.md).
  expect([img.width, img.height, ...at(img, 7, 5)]).toEqual([16, 12, 118, 118, 118]);
}

/**
 * Sends the path exactly as written over a real socket: an in-process injection would
 * normalise dot segments (as a WHATWG URL does) before the service ever saw them.
 */
function send(path: string): Promise<{ statusCode: number; headers: http.IncomingHttpHeaders; body: string; json(): unknown }> {
  return new Promise((resolve, reject) => {
    const req = http.request({ host: '127.0.0.1', port, path, agent: false }, (res) => {
      const chunks: Buffer[] = [];
      res.on('data', (c: Buffer) => chunks.push(c));
      res.on('end', () => {
        const body = Buffer.concat(chunks).toString('latin1');
        resolve({ statusCode: res.statusCode ?? 0, headers: res.headers, body, json: () => JSON.parse(body) });
      });
      res.on('error', reject);
    });
    req.on('error', reject);
    req.end();
  });
}

async function expectProblem(url: string, c: { name: string; status: number; code: string }, endpoint = 'renditions'): Promise<void> {
  const before = await cachedCount();
  const res = await send(`/v1/${endpoint}/${url}`);
  if (c.status === 200) {
    expect(res.statusCode, res.body.slice(0, 200)).toBe(200);
  } else {
    expect(res.statusCode, res.body.slice(0, 300)).toBe(c.status);
    expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
    const body = res.json() as Record<string, unknown>;
    // RFC 9457 section 3.1 members, plus our code.
    expect(body).toMatchObject({ status: c.status, code: c.code });
    expect(typeof body.type).toBe('string');
    expect(typeof body.title).toBe('string');
    expect(res.body).not.toMatch(/\n\s+at |node_modules|\.ts:\d+/);
    expect(res.headers['x-injected']).toBeUndefined();
    expect(await cachedCount()).toBe(before);
  }
  await expectControl();
}

beforeAll(async () => {
  probe = http.createServer((_req, res) => {
    probeHits++;
    res.end();
  });
  await new Promise<void>((r) => probe.listen(0, '127.0.0.1', r));
  const probeUrl = `http://127.0.0.1:${(probe.address() as AddressInfo).port}/thread.png`;
  // A queue long enough that the concurrent run below is never shed as overload (503).
  t = await build({ config: { limits: { maxFrames: 16 }, pool: { maxQueue: 256 } } });
  sources = await hostileSources(probeUrl);
  for (const s of sources) await writeFile(join(t.sourceDir, s.file), s.bytes);
  await writePng(t.sourceDir, 'control.png', 64, 48, 3, () => [118, 118, 118]);
  await writePng(t.sourceDir, 'grating.png', 64, 48, 3, (x) => (x % 2 ? [255, 255, 255] : [0, 0, 0]));
  await writePng(join(t.sourceDir, '..'), 'secret.png', 8, 8, 3, () => [200, 0, 0]);
  await symlink(join(t.sourceDir, '..', 'secret.png'), join(t.sourceDir, 'escape.png'));
  await t.app.listen({ port: 0, host: '127.0.0.1' });
  port = (t.app.server.address() as AddressInfo).port;
  await expectControl();
  baseline = settledMemory();
}, 60_000);

afterAll(async () => {
  await t?.close();
  await new Promise((r) => probe?.close(r));
});

describe('hostile corpus', () => {
  it('has at least 50 cases', () => {
    expect(sources.length + traversalCases.length + parameterCases.length).toBeGreaterThanOrEqual(50);
  });

  it('hostile source files', async () => {
    for (const s of sources) {
      await expectProblem(`${s.file}?width=32&format=png`, s).catch((e: Error) => {
        throw new Error(`${s.name}: ${e.message}`, { cause: e });
      });
    }
    expect(probeHits, 'an SVG reference was fetched').toBe(0);
  }, 60_000);

  it.each(traversalCases)('path traversal: $name', async (c: RequestCase) => expectProblem(c.url, c));

  it.each(traversalCases)('alias-risk path traversal: $name', async (c: RequestCase) => expectProblem(c.url, c, 'alias-risk'));

  it('hostile source files through the alias-risk endpoint', async () => {
    for (const s of sources.filter((x) => x.status !== 200)) {
      await expectProblem(`${s.file}?width=32`, s, 'alias-risk').catch((e: Error) => {
        throw new Error(`${s.name}: ${e.message}`, { cause: e });
      });
    }
  }, 60_000);

  it.each(parameterCases)('parameter abuse: $name', async (c: RequestCase) => expectProblem(c.url, c));

  it('serves correct renditions while the whole corpus arrives at once', async () => {
    const hostile = [
      ...sources.filter((s) => s.status !== 200).map((s) => ({ url: `${s.file}?width=24&format=png`, code: s.code })),
      ...traversalCases,
      ...parameterCases,
    ];
    const controls = Array.from({ length: 8 }, () => expectControl());
    const answers = await Promise.all(hostile.map((c) => send(`/v1/renditions/${c.url}`)));
    await Promise.all(controls);
    answers.forEach((res, i) => expect((res.json() as { code: string }).code, hostile[i].url).toBe(hostile[i].code));
  }, 60_000);

  it('still renders a fresh (uncached) rendition correctly afterwards', async () => {
    const res = await t.app.inject({ url: '/v1/renditions/grating.png?width=32&height=24&format=png&kernel=box' });
    expect(res.statusCode).toBe(200);
    expect(res.headers['server-timing']).toMatch(/miss/);
    const img = await pixels(res.rawPayload);
    // 1-px black/white stripes halved in linear light average to code 188 (CHECKS.md, IEC 61966-2-1).
    expect(Math.abs(at(img, 10, 10)[0] - 188)).toBeLessThanOrEqual(1);
  });

  it('memory returns near its baseline after the corpus', () => {
    const after = settledMemory();
    const mib = (b: number) => (b / 2 ** 20).toFixed(1);
    console.log(
      `hostile corpus memory: rss ${mib(baseline.rss)} -> ${mib(after.rss)} MiB, heap ${mib(baseline.heap)} -> ${mib(after.heap)} MiB`,
    );
    // Bounds, not timings: the corpus includes a 64 MiB inflate bomb and a 60000^2 header.
    expect(after.heap - baseline.heap).toBeLessThan(32 * 2 ** 20);
    expect(after.rss - baseline.rss).toBeLessThan(256 * 2 ** 20);
  });
});

import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { build, type TestApp } from '../helpers/build.js';
import { png, rampCode, upload } from './fixtures.js';

let t: TestApp;
beforeAll(async () => {
  // A small upload limit so the too-large case needs few bytes.
  t = await build({ config: { limits: { maxUploadBytes: 64 * 1024 } } });
});
afterAll(() => t.close());

describe('Prefer: respond-async', () => {
  it('answers 202 with the job URL, and the job URL gives the manifest once done', async () => {
    const bytes = await png(160, 120, rampCode(160));
    // RFC 7240 section 4.1: respond-async asks for 202 Accepted; RFC 9110 section 15.3.3: a 202
    // should point at a status monitor, here in Location. RFC 7240 section 3: Preference-Applied.
    const res = await upload(t.app, bytes, '?widths=80,160', { prefer: 'respond-async, wait=5' });
    expect(res.statusCode).toBe(202);
    expect(res.headers['preference-applied']).toBe('respond-async');
    const location = String(res.headers.location);
    expect(location).toMatch(/^\/v1\/ingest\/jobs\/[0-9a-f-]{36}$/);
    expect(['queued', 'running']).toContain(res.json().state);

    const id = location.split('/').pop()!;
    await t.app.ingest.jobs.settled(id); // the table's event, not a sleep
    const job = await t.app.inject({ method: 'GET', url: location });
    expect(job.statusCode).toBe(200);
    const body = job.json();
    expect(body.state).toBe('done');
    expect(body.manifest.renditions.map((r: any) => r.width)).toEqual([80, 160, 80, 160]);

    // Done already: a repeat answers the manifest at once (the preference is not applied).
    const again = await upload(t.app, bytes, '?widths=80,160', { prefer: 'respond-async' });
    expect(again.statusCode).toBe(200);
    expect(again.headers['preference-applied']).toBeUndefined();
    expect(again.json()).toEqual(body.manifest);
  });

  it('reports a job that fails, with its code', async () => {
    const { writeFile } = await import('node:fs/promises');
    const { join } = await import('node:path');
    // Valid PNG header, pixels cut off: the identity succeeds, the decode in the job fails.
    const whole = await png(64, 64, (x, y) => [x * 4, y * 4, (x * y) % 256]);
    await writeFile(join(t.sourceDir, 'cut.png'), whole.subarray(0, whole.length - 40));
    const res = await t.app.inject({ method: 'POST', url: '/v1/ingest', headers: { prefer: 'respond-async' }, payload: { source: 'cut.png' } });
    expect(res.statusCode).toBe(202);
    const id = String(res.headers.location).split('/').pop()!;
    await t.app.ingest.jobs.settled(id);
    const job = (await t.app.inject({ method: 'GET', url: String(res.headers.location) })).json();
    expect(job).toMatchObject({ state: 'failed', error: { code: 'ERR_SOURCE_CORRUPT' } });
  });

  it('answers 404 problem details for an unknown job', async () => {
    const res = await t.app.inject({ method: 'GET', url: '/v1/ingest/jobs/00000000-0000-4000-8000-000000000000' });
    expect(res.statusCode).toBe(404);
    expect(res.json().code).toBe('ERR_INGEST_JOB_NOT_FOUND');
  });
});

describe('bad uploads get 4xx problem details (RFC 9457) with a stable code', () => {
  const cases: Array<[string, () => Promise<{ headers: Record<string, string>; payload: Buffer | string; query?: string }>, number, string]> = [
    ['wrong content type', async () => ({ headers: { 'content-type': 'text/plain' }, payload: 'a shirt' }), 415, 'ERR_INGEST_MEDIA_TYPE'],
    ['empty body', async () => ({ headers: { 'content-type': 'image/png' }, payload: Buffer.alloc(0) }), 400, 'ERR_INGEST_EMPTY'],
    ['not an image', async () => ({ headers: { 'content-type': 'image/jpeg' }, payload: Buffer.alloc(500, 7) }), 415, 'ERR_SOURCE_UNSUPPORTED'],
    [
      'corrupt PNG',
      async () => {
        const whole = await png(64, 64, (x, y) => [x * 4, y * 4, 0]);
        return { headers: { 'content-type': 'image/png' }, payload: whole.subarray(0, whole.length - 40) };
      },
      422,
      'ERR_SOURCE_CORRUPT',
    ],
    ['too big', async () => ({ headers: { 'content-type': 'image/png' }, payload: Buffer.alloc(64 * 1024 + 1) }), 413, 'ERR_INGEST_TOO_LARGE'],
    ['bad widths', async () => ({ headers: { 'content-type': 'image/png' }, payload: await png(8, 8, rampCode(8)), query: '?widths=320,abc' }), 400, 'ERR_PARAM_INVALID'],
    ['unknown parameter', async () => ({ headers: { 'content-type': 'image/png' }, payload: await png(8, 8, rampCode(8)), query: '?width=320' }), 400, 'ERR_PARAM_UNKNOWN'],
    ['JSON without source', async () => ({ headers: { 'content-type': 'application/json' }, payload: '{"path":"x.png"}' }), 400, 'ERR_REQUEST_INVALID'],
    ['JSON source missing', async () => ({ headers: { 'content-type': 'application/json' }, payload: '{"source":"none/such.png"}' }), 404, 'ERR_SOURCE_NOT_FOUND'],
    ['JSON source outside the origin', async () => ({ headers: { 'content-type': 'application/json' }, payload: '{"source":"../../etc/shadow.png"}' }), 400, 'ERR_SOURCE_PATH_INVALID'],
  ];

  it.each(cases)('%s', async (_name, make, status, code) => {
    const { headers, payload, query = '' } = await make();
    const res = await t.app.inject({ method: 'POST', url: `/v1/ingest${query}`, headers, payload });
    expect(res.statusCode).toBe(status);
    expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
    const body = res.json();
    expect(body).toMatchObject({ status, code, type: expect.any(String), title: expect.any(String), detail: expect.any(String) });
    expect(JSON.stringify(body)).not.toMatch(/\bat .+\.ts:\d+/); // never a stack trace
  });

  it('refuses uploads when the origin is read-only, and keeps serving', async () => {
    const ro = await build({ config: { ingest: { writable: false } } });
    try {
      const res = await upload(ro.app, await png(8, 8, rampCode(8)));
      expect(res.statusCode).toBe(403);
      expect(res.json().code).toBe('ERR_INGEST_READ_ONLY');
      expect((await ro.app.inject({ method: 'GET', url: '/healthz' })).statusCode).toBe(200);
    } finally {
      await ro.close();
    }
  });
});

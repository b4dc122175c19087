import { readFileSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { TestApp } from '../helpers/build.js';
import { buildGoldenApp, type Recorded, send } from './replay.js';
import { goldenRequests } from './requests.js';

// Behaviour preservation: the same requests give the same statuses, headers and bytes as when
// test/golden/responses.json was recorded (scripts/golden.ts, `npm run golden:record`).
// A change that is meant to change responses re-records the file in the same commit.
const recorded = JSON.parse(readFileSync(new URL('./responses.json', import.meta.url), 'utf8')) as Record<string, Recorded>;
const requests = goldenRequests();

let t: TestApp;
const etags = new Map<string, string>();
beforeAll(async () => {
  t = await buildGoldenApp();
}, 180_000);
afterAll(() => t?.close());

/** The golden file is recorded on Node 20 (`npm run golden:record`). */
const recordedOnOtherNode = process.versions.node.split('.')[0] !== '20';
const isRiskJson = (name: string) => name.startsWith('GET /v1/alias-risk/') && !name.includes('view=');

describe('golden responses (in order: misses, hits, a conditional request)', () => {
  it('records exactly the request set', () => {
    expect(Object.keys(recorded)).toEqual(requests.map((r) => r.name));
  });

  it.each(requests.map((r, i) => [r.name, r, i] as const))('%s', async (_name, r, i) => {
    const got = await send(t, r, i, etags);
    if (recordedOnOtherNode && isRiskJson(r.name)) {
      // The alias-risk JSON carries full floating-point digits; V8's Math functions differ in the
      // last place between Node majors, so on a Node other than the recording's only the status
      // is compared (the renditions, pictures and every other body still byte for byte).
      expect(got.status).toBe(recorded[r.name].status);
      return;
    }
    expect(got, 'changed on purpose? npm run golden:record').toEqual(recorded[r.name]);
  });
});

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

describe('golden responses (in order: misses, hits, a conditional request)', () => {
  it('records exactly the request set', () => {
    expect(Object.keys(recorded)).toEqual(requests.map((r) => r.name));
  });

  it.each(requests.map((r, i) => [r.name, r, i] as const))('%s', async (_name, r, i) => {
    expect(await send(t, r, i, etags), 'changed on purpose? npm run golden:record').toEqual(recorded[r.name]);
  });
});

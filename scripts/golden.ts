/**
 * Records the behaviour-preservation set: every endpoint over the demo pictures, through the
 * app the tests build, as status, selected headers and a sha-256 of each body, into
 * test/golden/responses.json. test/golden/responses.test.ts replays the set and compares.
 * Re-record (`npm run golden:record`) only when a change is meant to change responses, and say
 * so in the commit (a change of rendition bytes also bumps pipelineVersion).
 */
import { writeFileSync } from 'node:fs';
import { goldenRequests } from '../test/golden/requests.js';
import { replayAll } from '../test/golden/replay.js';

const started = performance.now();
const responses = await replayAll();
const names = goldenRequests().map((r) => r.name);
if (new Set(names).size !== names.length) throw new Error('golden: two requests share a name');
writeFileSync('test/golden/responses.json', `${JSON.stringify(responses, null, 1)}\n`);
const byStatus = new Map<number, number>();
for (const r of Object.values(responses)) byStatus.set(r.status, (byStatus.get(r.status) ?? 0) + 1);
const summary = [...byStatus].sort(([a], [b]) => a - b).map(([s, n]) => `${s}: ${n}`).join(', ');
console.log(`golden: ${names.length} responses (${summary}) in ${((performance.now() - started) / 1000).toFixed(1)} s -> test/golden/responses.json`);
process.exit(0);

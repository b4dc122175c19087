/**
 * Upstreams without validators, and the per-host limit, against a real server on 127.0.0.1,
 * counting the requests it sees.
 */
import { EventEmitter } from 'node:events';
import type http from 'node:http';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { HttpOriginOptions } from '../../src/origins/http.js';
import { HostLimit } from '../../src/origins/host-limit.js';
import { eventCount } from '../helpers/gated-origin.js';
import { codeOf, originFor, payload, payloadSha256, startUpstream, type Upstream } from './upstream-server.js';

const held: http.ServerResponse[] = [];
const heldEvents = new EventEmitter();
let open = 0;
let most = 0;
let letThrough = false;

let up: Upstream;
let other: Upstream;
beforeAll(async () => {
  up = await startUpstream({
    '/held.png': (_req, res) => {
      open += 1;
      most = Math.max(most, open);
      res.on('finish', () => (open -= 1));
      if (letThrough) return void res.writeHead(200, { etag: '"h"' }).end(payload);
      held.push(res);
      heldEvents.emit('held');
    },
  });
  other = await startUpstream();
});
afterAll(async () => {
  await up.close();
  await other.close();
});

const origin = (over: Partial<HttpOriginOptions> = {}) => originFor([up, other], over);

const requestsFor = (path: string, from: number) => up.requests.slice(from).filter((r) => r.endsWith(` ${path}`));

describe('upstream sources without ETag or Last-Modified', () => {
  it.each(['/bare.png', '/plain.png'])('%s: a miss (identify, then read) downloads the bytes once', async (path) => {
    const o = origin();
    const before = up.requests.length;
    const identity = await o.identify(`${up.base}${path}`);
    const source = await o.read(`${up.base}${path}`);
    expect(identity.version).toBe(`sha256:${payloadSha256}`);
    expect(source.identity).toEqual(identity);
    expect(source.bytes.equals(payload)).toBe(true);
    expect(requestsFor(path, before)).toEqual([`HEAD ${path}`, `GET ${path}`]);
  });

  it('the content-hash identity is remembered for the identity TTL: 8 hits ask the upstream nothing', async () => {
    const o = origin({ identityTtlMs: 60_000 });
    const before = up.requests.length;
    await o.identify(`${up.base}/bare.png`);
    for (let i = 0; i < 8; i++) expect((await o.identify(`${up.base}/bare.png`)).version).toBe(`sha256:${payloadSha256}`);
    expect(requestsFor('/bare.png', before)).toEqual(['HEAD /bare.png', 'GET /bare.png']);
  });

  it('without a TTL each identify asks again (and a later read downloads afresh)', async () => {
    const o = origin({ identityTtlMs: 0 });
    const before = up.requests.length;
    await o.identify(`${up.base}/bare.png`);
    await o.read(`${up.base}/bare.png`); // takes the kept bytes
    await o.read(`${up.base}/bare.png`); // nothing kept: downloads
    expect(requestsFor('/bare.png', before)).toEqual(['HEAD /bare.png', 'GET /bare.png', 'GET /bare.png']);
  });

  it('a source with an ETag is identified by HEAD alone', async () => {
    const before = up.requests.length;
    expect((await origin().identify(`${up.base}/ok.png`)).version).toBe('etag:"weave-1"');
    expect(requestsFor('/ok.png', before)).toEqual(['HEAD /ok.png']);
  });
});

describe('per-host concurrency (origin.upstream.perHostConcurrency)', () => {
  it('holds at most the limit of requests to one host; the rest wait and then succeed', async () => {
    const o = origin({ perHostConcurrency: 2 });
    const two = eventCount(heldEvents, 'held', 2);
    const reads = Array.from({ length: 6 }, () => o.read(`${up.base}/held.png`));
    await two;
    // Another host is not held up by this one's line.
    expect((await o.read(`${other.base}/ok.png`)).bytes.equals(payload)).toBe(true);
    expect(up.requests.filter((r) => r === 'GET /held.png')).toHaveLength(2);
    letThrough = true;
    for (const res of held.splice(0)) res.writeHead(200, { etag: '"h"' }).end(payload);
    for (const s of await Promise.all(reads)) expect(s.bytes.equals(payload)).toBe(true);
    expect(most).toBe(2);
    expect(up.requests.filter((r) => r === 'GET /held.png')).toHaveLength(6);
  });

  it('a request that waits past its deadline gets ERR_UPSTREAM_TIMEOUT; an aborted one leaves the line', async () => {
    const limit = new HostLimit(1, 50);
    let release!: () => void;
    const first = limit.run('h', () => new Promise<void>((r) => (release = r)));
    expect(await codeOf(limit.run('h', async () => 'late'))).toBe('ERR_UPSTREAM_TIMEOUT');
    const controller = new AbortController();
    const aborted = limit.run('h', async () => 'never', controller.signal);
    controller.abort(new Error('client went away'));
    await expect(aborted).rejects.toThrow('client went away');
    release();
    await first;
    expect(limit.running('h')).toBe(0);
    expect(await limit.run('h', async () => 'next')).toBe('next');
  });
});

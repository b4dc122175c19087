import { once } from 'node:events';
import { request } from 'node:http';
import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { installShutdown } from '../../src/shutdown.js';
import { writePng } from '../helpers/images.js';
import { redisBinary, startRedis, type RedisProcess } from '../helpers/redis-server.js';
import { replica } from './replicas.js';

function get(port: number, path: string): Promise<{ status: number; bytes: number } | string> {
  return new Promise((resolve) => {
    const req = request({ host: '127.0.0.1', port, path, agent: false }, (res) => {
      let bytes = 0;
      res.on('data', (c: Buffer) => (bytes += c.length));
      res.on('end', () => resolve({ status: res.statusCode ?? 0, bytes }));
    });
    req.on('error', (e: NodeJS.ErrnoException) => resolve(e.code ?? 'error'));
    req.end();
  });
}

describe.skipIf(!redisBinary)('graceful shutdown of a replica', () => {
  let server: RedisProcess;
  let dir: string;
  beforeAll(async () => {
    server = await startRedis();
    dir = await mkdtemp(join(tmpdir(), 'fw-shutdown-'));
    await writePng(dir, 'twill.png', 64, 64, 3, (x, y) => ((x + y) % 4 < 2 ? [90, 60, 40] : [220, 200, 170]));
  });
  afterAll(async () => {
    await server?.stop();
    await rm(dir, { recursive: true, force: true });
  });

  it('SIGTERM: refuses new connections, finishes the render in flight, closes Redis and the pool', async () => {
    const r = await replica(dir, server.url);
    await r.app.listen({ host: '127.0.0.1', port: 0 });
    const port = (r.app.server.address() as { port: number }).port;
    const exited = new Promise<number>((resolve) => {
      const handle = installShutdown(r.app, { deadlineMs: 30_000, signals: ['SIGTERM'], exit: (c) => { handle.dispose(); resolve(c); } });
    });
    r.origin.close();
    const reading = once(r.origin, 'read');
    const inFlight = get(port, '/v1/renditions/twill.png?width=32&format=png');
    await reading; // the render has started
    process.emit('SIGTERM', 'SIGTERM');
    await vi.waitFor(() => expect(r.app.server.listening).toBe(false));
    expect(await get(port, '/healthz')).toBe('ECONNREFUSED');
    expect(r.app.sharedRedis!.tier.link.client.status).toBe('ready'); // not closed under the render
    r.origin.open();
    const done = await inFlight;
    expect(done).toMatchObject({ status: 200 });
    expect(await exited).toBe(0);
    expect(r.app.sharedRedis!.tier.link.client.status).toBe('end');
    expect(r.logs.some((l) => /shutting down/.test(l.msg))).toBe(true);
    await r.close().catch(() => {}); // removes its folders; the app is already closed
  });
});

import Fastify from 'fastify';
import { describe, expect, it } from 'vitest';
import errorsPlugin from '../../../src/http/plugins/errors.js';
import stoppingPlugin from '../../../src/http/plugins/stopping.js';

function deferred<T = void>() {
  let resolve!: (v: T) => void;
  const promise = new Promise<T>((r) => (resolve = r));
  return { promise, resolve };
}

describe('requests that arrive while the app closes', () => {
  it('get 503 ERR_SERVICE_STOPPING as problem+json with Retry-After, not Fastify’s own body', async () => {
    const app = Fastify({ logger: false, return503OnClosing: false });
    await app.register(errorsPlugin);
    await app.register(stoppingPlugin, { retryAfterSeconds: 3 });
    app.get('/other', async () => ({ other: true }));
    // Holds the close between its start and the listener's end: the window in which a
    // request can still arrive (other plugins' preClose hooks, such as the ingest drain).
    const inClose = deferred();
    const finishClose = deferred();
    app.addHook('preClose', async () => {
      inClose.resolve();
      await finishClose.promise;
    });
    await app.listen({ host: '127.0.0.1', port: 0 });
    const address = app.server.address();
    const port = typeof address === 'object' && address ? address.port : 0;

    expect((await fetch(`http://127.0.0.1:${port}/other`)).status).toBe(200);
    const closed = app.close();
    await inClose.promise;
    const res = await fetch(`http://127.0.0.1:${port}/other`);
    finishClose.resolve();
    await closed;

    expect(res.status).toBe(503);
    expect(res.headers.get('content-type')).toMatch(/^application\/problem\+json/);
    expect(res.headers.get('retry-after')).toBe('3');
    expect(res.headers.get('connection')).toBe('close');
    const body = (await res.json()) as { code: string; status: number };
    expect(body.code).toBe('ERR_SERVICE_STOPPING');
    expect(body.status).toBe(503);
  });
});

import { request } from 'node:http';
import Fastify, { type FastifyInstance } from 'fastify';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { installShutdown, type ShutdownHandle } from '../src/shutdown.js';

function deferred<T = void>() {
  let resolve!: (v: T) => void;
  const promise = new Promise<T>((r) => (resolve = r));
  return { promise, resolve };
}

/** GET on loopback; resolves with the status or the connection error's code. */
function get(port: number, path: string): Promise<number | string> {
  return new Promise((resolve) => {
    const req = request({ host: '127.0.0.1', port, path, agent: false }, (res) => {
      res.resume();
      res.on('end', () => resolve(res.statusCode ?? 0));
    });
    req.on('error', (e: NodeJS.ErrnoException) => resolve(e.code ?? 'error'));
    req.end();
  });
}

/** An app whose /slow route waits until the test lets it finish; `entered` fires when it starts. */
async function slowApp() {
  const entered = deferred();
  const release = deferred();
  let closed = false;
  const app = Fastify({ logger: false });
  app.get('/slow', async () => {
    entered.resolve();
    await release.promise;
    return { done: true };
  });
  app.addHook('onClose', async () => { closed = true; }); // stands in for pool and Redis
  await app.listen({ host: '127.0.0.1', port: 0 });
  const address = app.server.address();
  const port = typeof address === 'object' && address ? address.port : 0;
  return { app, port, entered, release, wasClosed: () => closed };
}

describe('installShutdown', () => {
  const handles: ShutdownHandle[] = [];
  const apps: FastifyInstance[] = [];
  afterEach(() => {
    handles.splice(0).forEach((h) => h.dispose());
    for (const a of apps.splice(0)) a.server.closeAllConnections();
  });

  it('on SIGTERM stops accepting, finishes the in-flight request, closes plugins, exits 0', async () => {
    const { app, port, entered, release, wasClosed } = await slowApp();
    apps.push(app);
    const exited = deferred<number>();
    handles.push(installShutdown(app, { deadlineMs: 30_000, signals: ['SIGTERM'], exit: exited.resolve }));
    const inFlight = get(port, '/slow');
    await entered.promise;
    process.emit('SIGTERM', 'SIGTERM');
    await vi.waitFor(() => expect(app.server.listening).toBe(false));
    expect(await get(port, '/slow')).toBe('ECONNREFUSED');
    expect(wasClosed()).toBe(false); // still waiting for the in-flight request
    release.resolve();
    expect(await inFlight).toBe(200);
    expect(await exited.promise).toBe(0);
    expect(wasClosed()).toBe(true);
  });

  it('gives up with exit 1 when in-flight work outlives the deadline', async () => {
    const { app, port, entered } = await slowApp();
    apps.push(app);
    const codes: number[] = [];
    const handle = installShutdown(app, { deadlineMs: 50, signals: [], exit: (c) => codes.push(c) });
    handles.push(handle);
    void get(port, '/slow');
    await entered.promise;
    expect(await handle.shutdown('test')).toBe(1);
    expect(codes).toEqual([1]);
  });

  it('is idempotent, and a second signal exits at once', async () => {
    const { app, port, entered } = await slowApp();
    apps.push(app);
    const codes: number[] = [];
    const handle = installShutdown(app, { deadlineMs: 30_000, signals: ['SIGINT'], exit: (c) => codes.push(c) });
    handles.push(handle);
    void get(port, '/slow');
    await entered.promise;
    expect(handle.begun()).toBe(false);
    const first = handle.shutdown('one');
    expect(handle.begun()).toBe(true);
    expect(handle.shutdown('two')).toBe(first);
    process.emit('SIGINT', 'SIGINT');
    expect(codes).toEqual([1]);
  });

  it('exits only after the logger has written what it holds', async () => {
    const app = Fastify({ logger: false });
    apps.push(app);
    await app.ready();
    // The logger's flush calls back when its buffered lines are written (pino's logger.flush).
    const flushAsked = deferred<() => void>();
    (app.log as unknown as { flush: (cb: () => void) => void }).flush = (cb) => flushAsked.resolve(cb);
    const codes: number[] = [];
    const handle = installShutdown(app, { deadlineMs: 30_000, signals: [], exit: (c) => codes.push(c) });
    handles.push(handle);
    const done = handle.shutdown('test');
    const written = await flushAsked.promise;
    expect(codes).toEqual([]);
    written();
    expect(await done).toBe(0);
    expect(codes).toEqual([0]);
  });
});

/**
 * Clients that hold connections open on purpose, over real sockets on 127.0.0.1: one that
 * connects and sends nothing, one that sends half an upload and stalls. The server closes
 * both once server.idleTimeoutMs passes without a byte, stores nothing, and keeps serving.
 * Synchronised on the sockets' close events, never on sleeps or elapsed time.
 */
import { readdir } from 'node:fs/promises';
import type { AddressInfo } from 'node:net';
import net from 'node:net';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { build, type TestApp } from '../helpers/build.js';
import { writePng } from '../helpers/images.js';

let t: TestApp;
let port = 0;

/** Opens a raw connection, writes `text`, and resolves with what came back once the server closes it. */
function holdOpen(text: string): Promise<string> {
  return new Promise((resolve, reject) => {
    const socket = net.connect(port, '127.0.0.1', () => socket.write(text));
    let received = '';
    socket.on('data', (d) => (received += d.toString('latin1')));
    socket.on('close', () => resolve(received));
    socket.on('error', (e: NodeJS.ErrnoException) => (e.code === 'ECONNRESET' ? undefined : reject(e)));
  });
}

beforeAll(async () => {
  t = await build({ config: { server: { idleTimeoutMs: 200 } } });
  await writePng(t.sourceDir, 'control.png', 16, 16, 3, () => [1, 2, 3]);
  await t.app.listen({ port: 0, host: '127.0.0.1' });
  port = (t.app.server.address() as AddressInfo).port;
});
afterAll(() => t.close());

describe('slow and stalled clients', () => {
  it('a connection that never sends a request is closed', async () => {
    expect(await holdOpen('')).toBe('');
  });

  it('an upload that stalls half-way is closed and nothing is stored', async () => {
    const head = 'POST /v1/ingest HTTP/1.1\r\nHost: 127.0.0.1\r\nContent-Type: image/png\r\nContent-Length: 100000\r\n\r\n';
    const answer = await holdOpen(head + 'x'.repeat(5000));
    expect(answer).not.toMatch(/^HTTP\/1\.1 2/);
    const stored = await readdir(join(t.sourceDir, 'uploads')).catch(() => []);
    expect(stored).toEqual([]);
  });

  it('headers that stop mid-line are closed too', async () => {
    expect(await holdOpen('GET /v1/renditions/control.png?width=8 HTTP/1.1\r\nHost: 127.')).not.toMatch(/^HTTP\/1\.1 2/);
  });

  it('the service still answers', async () => {
    const res = await t.app.inject({ url: '/v1/renditions/control.png?width=8&format=png' });
    expect(res.statusCode).toBe(200);
  });
});

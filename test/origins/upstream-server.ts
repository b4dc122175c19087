/**
 * A real upstream on 127.0.0.1 for origin tests, with routes that misbehave on purpose.
 * Every socket is tracked and destroyed on close, so a hanging route never outlives a test.
 */
import { createHash } from 'node:crypto';
import http from 'node:http';
import { FoldwiseError } from '../../src/errors.js';
import { createHttpOrigin, type HttpOriginOptions } from '../../src/origins/http.js';
import type { AddressInfo, Socket } from 'node:net';

export interface Upstream {
  port: number;
  base: string;
  /** Host headers seen, in order. */
  hosts: string[];
  /** Paths requested, with method, in order. */
  requests: string[];
  close(): Promise<void>;
}

/** A small, valid-looking byte payload; content does not matter to the origin. */
export const payload = Buffer.from(Array.from({ length: 2048 }, (_, i) => (i * 31) & 0xff));
export const payloadSha256 = createHash('sha256').update(payload).digest('hex');

type Route = (req: http.IncomingMessage, res: http.ServerResponse, socket: Socket) => void;

const routes: Record<string, Route> = {
  '/ok.png': (req, res) => {
    res.writeHead(200, { 'content-type': 'image/png', etag: '"weave-1"', 'content-length': payload.length });
    res.end(req.method === 'HEAD' ? undefined : payload);
  },
  '/modified.png': (_req, res) => {
    res.writeHead(200, { 'last-modified': 'Tue, 01 Dec 2026 10:00:00 GMT' });
    res.end(payload);
  },
  '/plain.png': (req, res) => {
    if (req.method === 'HEAD') return void res.writeHead(405).end();
    res.end(payload);
  },
  '/bare.png': (req, res) => {
    // No ETag, no Last-Modified: the bytes are the only identity.
    res.writeHead(200, { 'content-type': 'image/png', 'content-length': payload.length });
    res.end(req.method === 'HEAD' ? undefined : payload);
  },
  '/missing.png': (_req, res) => void res.writeHead(404).end('no'),
  '/broken.png': (_req, res) => void res.writeHead(500).end('upstream trouble'),
  '/hang.png': () => undefined,
  '/reset.png': (_req, res, socket) => {
    res.writeHead(200, { 'content-length': 10_000 });
    res.write(payload, () => socket.destroy());
  },
  '/overdeclared.png': (_req, _res, socket) => {
    socket.end(Buffer.concat([Buffer.from('HTTP/1.1 200 OK\r\nContent-Length: 10\r\nConnection: close\r\n\r\n'), payload]));
  },
  '/overdeclared-keepalive.png': (_req, _res, socket) => {
    socket.write(Buffer.concat([Buffer.from('HTTP/1.1 200 OK\r\nContent-Length: 10\r\n\r\n'), payload]));
  },
  '/declared-large.png': (_req, res) => {
    res.writeHead(200, { 'content-length': 1_000_000 });
    res.end(Buffer.alloc(1_000_000));
  },
  '/chunked-large.png': (_req, res) => {
    res.writeHead(200);
    for (let i = 0; i < 100; i++) res.write(Buffer.alloc(10_000));
    res.end();
  },
  '/dribble.png': (_req, res) => {
    res.writeHead(200, { 'content-length': 1000 });
    let sent = 0;
    const tick = setInterval(() => {
      if (res.destroyed || sent >= 1000) return clearInterval(tick);
      res.write(Buffer.alloc(10));
      sent += 10;
    }, 20);
  },
  '/to-metadata.png': (_req, res) => void res.writeHead(302, { location: 'http://169.254.169.254/latest/meta-data/' }).end(),
  '/to-loop.png': (_req, res) => void res.writeHead(307, { location: '/to-loop.png' }).end(),
  '/to-nowhere.png': (_req, res) => void res.writeHead(301).end(),
};

function redirectChain(url: string, res: http.ServerResponse): boolean {
  const m = /^\/chain\/(\d+)$/.exec(url);
  if (!m) return false;
  const n = Number(m[1]);
  res.writeHead(n % 2 === 0 ? 301 : 308, { location: n > 1 ? `/chain/${n - 1}` : '/ok.png' }).end();
  return true;
}

/** Starts the upstream; `extra` adds or replaces routes for one test. */
export async function startUpstream(extra: Record<string, Route> = {}): Promise<Upstream> {
  const all = { ...routes, ...extra };
  const hosts: string[] = [];
  const requests: string[] = [];
  const sockets = new Set<Socket>();
  const server = http.createServer((req, res) => {
    hosts.push(req.headers.host ?? '');
    requests.push(`${req.method} ${req.url}`);
    if (redirectChain(req.url ?? '', res)) return;
    const route = all[req.url ?? ''];
    if (route) route(req, res, req.socket);
    else res.writeHead(404).end();
  });
  server.on('connection', (s) => {
    sockets.add(s);
    s.on('close', () => sockets.delete(s));
  });
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  const { port } = server.address() as AddressInfo;
  return {
    port,
    base: `127.0.0.1:${port}`,
    hosts,
    requests,
    close: () =>
      new Promise<void>((resolve) => {
        for (const s of sockets) s.destroy();
        server.close(() => resolve());
      }),
  };
}

/** The FoldwiseError code a promise rejects with; fails when it resolves or throws otherwise. */
export async function codeOf(p: Promise<unknown>): Promise<string> {
  try {
    await p;
  } catch (e) {
    if (e instanceof FoldwiseError) return e.code;
    throw e;
  }
  throw new Error('expected a rejection');
}

/**
 * An http origin allowed to reach these upstreams (loopback, so private addresses allowed):
 * 64 KiB at most, three redirects, and deadlines generous enough that a slow shared CI
 * machine cannot turn a prompt answer into a timeout (a test of a deadline passes its own).
 */
export function originFor(upstreams: Upstream[], over: Partial<HttpOriginOptions> = {}) {
  return createHttpOrigin({
    allowHosts: upstreams.map((u) => `http://${u.base}`),
    allowPrivate: true,
    timeouts: { connectMs: 5000, headersMs: 5000, bodyMs: 5000 },
    maxBytes: 64 * 1024,
    maxRedirects: 3,
    ...over,
  });
}

/**
 * A slow upstream on 127.0.0.1 for load/hostile.ts: HEAD answers at once with an ETag; GET
 * sends its headers at once and then drips the body (a real JPEG) over `seconds`, the way a
 * congested or hostile origin does. Stops dripping when closed.
 */
import { once } from 'node:events';
import http from 'node:http';
import type { AddressInfo } from 'node:net';

export interface DripUpstream {
  /** host:port, as the ~upstream/ route and the allowlist spell it. */
  base: string;
  close(): Promise<void>;
}

export async function startDripUpstream(body: Buffer, seconds: number): Promise<DripUpstream> {
  const timers = new Set<NodeJS.Timeout>();
  const server = http.createServer((req, res) => {
    const headers = { 'content-type': 'image/jpeg', 'content-length': body.length, etag: `"drip-${req.url}"` };
    res.writeHead(200, headers);
    if (req.method === 'HEAD') return void res.end();
    const chunks = 40;
    const size = Math.ceil(body.length / chunks);
    let i = 0;
    const timer = setInterval(() => {
      res.write(body.subarray(i * size, (i + 1) * size));
      if (++i >= chunks) {
        clearInterval(timer);
        timers.delete(timer);
        res.end();
      }
    }, (seconds * 1000) / chunks);
    timers.add(timer);
    res.once('close', () => (clearInterval(timer), timers.delete(timer)));
  });
  server.listen(0, '127.0.0.1');
  await once(server, 'listening');
  const { port } = server.address() as AddressInfo;
  return {
    base: `127.0.0.1:${port}`,
    async close() {
      for (const t of timers) clearInterval(t);
      server.closeAllConnections();
      server.close();
    },
  };
}

/**
 * One upstream request (no redirects): resolve the host, check every address, connect to the
 * checked address only (pinned, with the real Host header and TLS server name), and read the
 * body under a byte limit with separate connect, header and body deadlines.
 */
import http from 'node:http';
import https from 'node:https';
import { isIP, type LookupFunction } from 'node:net';
import { FoldwiseError } from '../errors.js';
import type { AddressGuard } from './address-guard.js';

export interface ResolvedAddress {
  address: string;
  family: number;
}

/** Resolves a host name to every address it has (like dns.lookup with all: true). */
export type Resolver = (hostname: string) => Promise<ResolvedAddress[]>;

export interface HopOptions {
  guard: AddressGuard;
  resolve: Resolver;
  timeouts: { connectMs: number; headersMs: number; bodyMs: number };
  maxBytes: number;
  /** Extra trusted certificate authorities for https upstreams (PEM); the system list otherwise. */
  ca?: string | Buffer;
  signal?: AbortSignal;
}

export interface HopResult {
  status: number;
  headers: http.IncomingHttpHeaders;
  /** Present for a 200 answer to GET; redirects and errors are not read. */
  body?: Buffer;
}

/** Resolves within the connect deadline: a stalled resolver is a connect timeout. */
async function resolveWithin(hostname: string, opts: HopOptions): Promise<ResolvedAddress[]> {
  let timer: NodeJS.Timeout | undefined;
  const timeout = new Promise<never>((_, reject) => {
    timer = setTimeout(() => {
      reject(new FoldwiseError('ERR_UPSTREAM_TIMEOUT', `resolving ${hostname} took longer than ${opts.timeouts.connectMs} ms`));
    }, opts.timeouts.connectMs);
  });
  try {
    return await Promise.race([
      opts.resolve(hostname).catch((cause: unknown) => {
        throw new FoldwiseError('ERR_UPSTREAM_FAILED', `upstream host ${hostname} does not resolve`, { cause });
      }),
      timeout,
    ]);
  } finally {
    clearTimeout(timer);
  }
}

export async function pickAddress(hostname: string, opts: HopOptions): Promise<ResolvedAddress> {
  const family = isIP(hostname);
  const addresses = family !== 0 ? [{ address: hostname, family }] : await resolveWithin(hostname, opts);
  if (addresses.length === 0) throw new FoldwiseError('ERR_UPSTREAM_FAILED', `upstream host ${hostname} has no address`);
  // Every address, not just the first: a host with one public and one internal address
  // could otherwise be steered to the internal one by the connection's address choice.
  for (const a of addresses) {
    const { allowed, verdict } = opts.guard.check(a.address);
    if (!allowed) {
      throw new FoldwiseError('ERR_UPSTREAM_FORBIDDEN', `upstream host ${hostname} resolves to a non-public address (${verdict.range})`);
    }
  }
  return addresses[0];
}

/** A lookup that always answers the one address already checked (no second DNS query). */
export function pinned(target: ResolvedAddress): LookupFunction {
  return ((_host: string, options: { all?: boolean }, callback: (...args: unknown[]) => void) => {
    if (options && options.all) callback(null, [{ address: target.address, family: target.family }]);
    else callback(null, target.address, target.family);
  }) as unknown as LookupFunction;
}

/** Performs one GET or HEAD; never follows redirects. */
export async function fetchHop(url: URL, method: 'GET' | 'HEAD', opts: HopOptions): Promise<HopResult> {
  const started = Date.now();
  const hostname = url.hostname.replace(/^\[|\]$/g, '');
  const target = await pickAddress(hostname, opts);
  const remainingConnect = Math.max(1, opts.timeouts.connectMs - (Date.now() - started));
  const client = url.protocol === 'https:' ? https : http;

  return new Promise<HopResult>((resolve, reject) => {
    let timer: NodeJS.Timeout | undefined;
    let settled = false;
    const finish = (err: unknown, result?: HopResult): void => {
      if (settled) return;
      settled = true;
      clearTimeout(timer);
      if (err) {
        req.destroy();
        reject(err);
      } else resolve(result as HopResult);
    };
    const deadline = (ms: number, phase: string): void => {
      clearTimeout(timer);
      timer = setTimeout(() => {
        finish(new FoldwiseError('ERR_UPSTREAM_TIMEOUT', `upstream ${phase} took longer than ${ms} ms`));
      }, ms);
    };
    const failed = (cause: unknown): void => {
      if (opts.signal?.aborted) return finish(opts.signal.reason ?? cause);
      finish(new FoldwiseError('ERR_UPSTREAM_FAILED', 'upstream connection failed', { cause }));
    };

    const req = client.request({
      protocol: url.protocol,
      hostname,
      port: url.port || undefined,
      path: `${url.pathname}${url.search}`,
      method,
      agent: false,
      lookup: pinned(target),
      servername: isIP(hostname) === 0 ? hostname : undefined,
      ...(opts.ca ? { ca: opts.ca } : {}),
      headers: { accept: 'image/*', 'accept-encoding': 'identity', 'user-agent': 'foldwise-upstream' },
      signal: opts.signal,
    });
    deadline(remainingConnect, 'connect');
    req.on('socket', (socket) => {
      const connected = (): void => deadline(opts.timeouts.headersMs, 'response headers');
      socket.once(url.protocol === 'https:' ? 'secureConnect' : 'connect', connected);
    });
    req.on('error', failed);
    req.on('response', (res) => {
      const status = res.statusCode ?? 0;
      if (method === 'HEAD' || status !== 200) {
        res.destroy();
        return finish(undefined, { status, headers: res.headers });
      }
      const declared = res.headers['content-length'] === undefined ? undefined : Number(res.headers['content-length']);
      if (declared !== undefined && declared > opts.maxBytes) {
        return finish(new FoldwiseError('ERR_SOURCE_TOO_LARGE', `upstream declares ${declared} bytes; the limit is ${opts.maxBytes}`));
      }
      deadline(opts.timeouts.bodyMs, 'body');
      const chunks: Buffer[] = [];
      let total = 0;
      res.on('data', (chunk: Buffer) => {
        total += chunk.length;
        if (total > opts.maxBytes) {
          finish(new FoldwiseError('ERR_SOURCE_TOO_LARGE', `upstream body exceeds the limit of ${opts.maxBytes} bytes`));
        } else chunks.push(chunk);
      });
      res.on('error', failed);
      res.on('end', () => {
        if (declared !== undefined && total !== declared) {
          return failed(new Error(`body length ${total} differs from Content-Length ${declared}`));
        }
        finish(undefined, { status, headers: res.headers, body: Buffer.concat(chunks, total) });
      });
      res.on('close', () => {
        if (!res.complete) failed(new Error('upstream closed the connection mid-body'));
      });
    });
    req.end();
  });
}

/**
 * The HTTP(S) upstream origin. A source path is `<host>[:port]/<path>`; the host must be on
 * the allowlist, every address it resolves to must pass the address guard, redirects are
 * followed a bounded number of times and each hop is checked again, and the body is read
 * under a byte limit and three deadlines (the body's is for the whole body, not per chunk), with
 * at most `perHostConcurrency` requests to one host at once. The source identity is the
 * upstream URL plus its ETag, else its Last-Modified, else a SHA-256 of the bytes, remembered
 * for `identityTtlMs`.
 */
import { createHash } from 'node:crypto';
import { lookup } from 'node:dns/promises';
import { FoldwiseError } from '../errors.js';
import { createAddressGuard } from './address-guard.js';
import { isAllowedUrl, parseAllowHosts, resolveSourceUrl } from './http-allowlist.js';
import { ContentIdentities } from './content-identity.js';
import { HostLimit } from './host-limit.js';
import { fetchHop, type HopOptions, type HopResult, type Resolver } from './http-fetch.js';
import type { Origin, SourceBytes, SourceIdentity } from './types.js';

export interface HttpOriginOptions {
  /** Entries like "https://cdn.example.org", "http://127.0.0.1:8123"; a bare host means https. */
  allowHosts: string[];
  /** Allow private, loopback, link-local, unique-local and CGNAT addresses (tests, intranets). */
  allowPrivate?: boolean;
  /** Extra CIDR blocks allowed even though not public, e.g. ["127.0.0.1/32"]. */
  allowAddresses?: string[];
  timeouts: { connectMs: number; headersMs: number; bodyMs: number };
  maxBytes: number;
  maxRedirects: number;
  /** Certificate authorities trusted for https upstreams (PEM), e.g. a private CA. */
  ca?: string | Buffer;
  /** Name resolution; defaults to the system resolver (dns.lookup, all addresses). */
  resolve?: Resolver;
  /** Requests to one host at once (default 4); more wait in line up to timeouts.bodyMs. */
  perHostConcurrency?: number;
  /** How long a content-hash identity (no ETag, no Last-Modified) is trusted; 0 = not kept. */
  identityTtlMs?: number;
}

/** Redirect statuses that carry a Location to follow (RFC 9110 section 15.4). */
const redirects = new Set([301, 302, 303, 307, 308]);

const systemResolve: Resolver = (hostname) => lookup(hostname, { all: true, verbatim: true });

function header(result: HopResult, name: string): string | undefined {
  const v = result.headers[name];
  return Array.isArray(v) ? v[0] : v;
}

/** ETag, else Last-Modified; undefined when the upstream gives neither validator. */
function validator(result: HopResult): string | undefined {
  const etag = header(result, 'etag');
  if (etag) return `etag:${etag}`;
  const modified = header(result, 'last-modified');
  return modified ? `modified:${modified}` : undefined;
}

/** Creates an Origin that reads sources from allowlisted HTTP(S) upstreams. */
export function createHttpOrigin(options: HttpOriginOptions): Origin {
  const allowed = parseAllowHosts(options.allowHosts);
  if (!(options.maxRedirects >= 0) || !(options.maxBytes > 0)) {
    throw new RangeError('http origin: maxRedirects must be >= 0 and maxBytes > 0');
  }
  const guard = createAddressGuard({ allowPrivate: options.allowPrivate, allowAddresses: options.allowAddresses });
  const resolve = options.resolve ?? systemResolve;
  const limit = new HostLimit(options.perHostConcurrency ?? 4, options.timeouts.bodyMs);
  const content = new ContentIdentities(options.identityTtlMs ?? 0, options.maxBytes);

  async function follow(start: URL, method: 'GET' | 'HEAD', signal?: AbortSignal): Promise<HopResult> {
    const hop: HopOptions = { guard, resolve, timeouts: options.timeouts, maxBytes: options.maxBytes, ca: options.ca, signal };
    let url = start;
    for (let followed = 0; ; followed++) {
      const result = await limit.run(url.host, () => fetchHop(url, method, hop), signal);
      const location = header(result, 'location');
      if (!redirects.has(result.status) || !location) return result;
      if (followed >= options.maxRedirects) {
        throw new FoldwiseError('ERR_UPSTREAM_FAILED', `upstream redirected more than ${options.maxRedirects} times`);
      }
      let next: URL;
      try {
        next = new URL(location, url);
      } catch (cause) {
        throw new FoldwiseError('ERR_UPSTREAM_FAILED', 'upstream sent an unusable redirect', { cause });
      }
      if (!isAllowedUrl(next, allowed)) {
        throw new FoldwiseError('ERR_UPSTREAM_FORBIDDEN', `upstream redirected to ${next.origin}, which is not on the allowlist`);
      }
      url = next;
    }
  }

  function expectOk(result: HopResult, key: string): void {
    if (result.status === 200) return;
    if (result.status === 404 || result.status === 410) {
      throw new FoldwiseError('ERR_SOURCE_NOT_FOUND', `upstream has no ${key}`);
    }
    throw new FoldwiseError('ERR_UPSTREAM_FAILED', `upstream answered ${result.status}`);
  }

  async function download(url: URL, signal?: AbortSignal): Promise<SourceBytes> {
    const result = await follow(url, 'GET', signal);
    expectOk(result, url.href);
    const bytes = result.body ?? Buffer.alloc(0);
    const version = validator(result);
    const identity = { key: url.href, version: version ?? `sha256:${createHash('sha256').update(bytes).digest('hex')}` };
    // A content-hash identity is remembered, so hits within the TTL ask the upstream nothing.
    if (!version) content.remember(identity);
    return { identity, bytes, contentType: header(result, 'content-type') };
  }

  async function read(path: string, signal?: AbortSignal): Promise<SourceBytes> {
    const url = resolveSourceUrl(path, allowed);
    // The bytes identify() just downloaded: a miss downloads a source once, not twice.
    return content.take(url.href) ?? download(url, signal);
  }

  async function identify(path: string, signal?: AbortSignal): Promise<SourceIdentity> {
    const url = resolveSourceUrl(path, allowed);
    const known = content.identity(url.href);
    if (known) return known;
    const head = await follow(url, 'HEAD', signal).catch((e: unknown) => {
      if (e instanceof FoldwiseError && e.code !== 'ERR_UPSTREAM_FAILED') throw e;
      return undefined;
    });
    const version = head && head.status === 200 ? validator(head) : undefined;
    if (head && (head.status === 404 || head.status === 410)) expectOk(head, url.href);
    if (version) return { key: url.href, version };
    // Without a validator (or without HEAD support) the bytes themselves are the version; they
    // are kept briefly for the read that follows on a miss.
    const source = await download(url, signal);
    content.keep(source);
    return source.identity;
  }

  return { name: 'http', read, identify };
}

/**
 * Callbacks when an ingest job ends: foldwise POSTs the outcome as JSON to the URL the upload
 * named. The target is held to the upstream rules (SSRF): its origin must be on the upstream
 * allowlist, and every address its host resolves to must pass the same address guard, checked
 * at each attempt and connected to pinned (no second DNS answer). Redirects are not followed.
 *
 * The body is signed: Foldwise-Callback-Time is the sending time in Unix seconds and
 * Foldwise-Callback-Signature the base64url HMAC-SHA256 (RFC 2104, FIPS 180-4) under the
 * first signing key of `<time>.<body>`, so a receiver can refuse old (replayed) bodies.
 */
import { createHmac } from 'node:crypto';
import http from 'node:http';
import https from 'node:https';
import { FoldwiseError } from '../errors.js';
import type { AddressGuard } from '../origins/address-guard.js';
import { type AllowedUpstream, isAllowedUrl } from '../origins/http-allowlist.js';
import { pickAddress, pinned, type Resolver } from '../origins/http-fetch.js';

export const callbackTimeHeader = 'foldwise-callback-time';
export const callbackSignatureHeader = 'foldwise-callback-signature';

/** The callback URL, refused unless http(s) and on the upstream allowlist. */
export function checkCallbackUrl(text: string, allowed: AllowedUpstream[]): URL {
  let url: URL;
  try {
    url = new URL(text);
  } catch {
    throw new FoldwiseError('ERR_PARAM_INVALID', 'callback must be an absolute http(s) URL');
  }
  if (url.protocol !== 'http:' && url.protocol !== 'https:') throw new FoldwiseError('ERR_PARAM_INVALID', 'callback must be an absolute http(s) URL');
  if (!isAllowedUrl(url, allowed)) {
    throw new FoldwiseError('ERR_UPSTREAM_FORBIDDEN', `callback host ${url.host} is not on the upstream allowlist (origin.upstream.allowHosts)`);
  }
  return url;
}

/** The signature of a body sent at `time` (Unix seconds). */
export function callbackSignature(body: string, time: number, key: string): string {
  return createHmac('sha256', key).update(`${time}.${body}`).digest('base64url');
}

export interface DeliveryOptions {
  guard: AddressGuard;
  resolve: Resolver;
  /** Whole attempt: connect, send, answer. */
  timeoutMs: number;
  key: string;
}

/** One attempt: resolves on a 2xx answer; rejects (to be retried) on anything else. */
export async function deliverCallback(target: string, body: string, opts: DeliveryOptions): Promise<number> {
  const url = new URL(target);
  const hostname = url.hostname.replace(/^\[|\]$/g, '');
  const address = await pickAddress(hostname, {
    guard: opts.guard,
    resolve: opts.resolve,
    timeouts: { connectMs: opts.timeoutMs, headersMs: opts.timeoutMs, bodyMs: opts.timeoutMs },
    maxBytes: 0,
  });
  const time = Math.floor(Date.now() / 1000);
  const client = url.protocol === 'https:' ? https : http;
  return new Promise<number>((resolve, reject) => {
    const req = client.request({
      protocol: url.protocol,
      hostname,
      port: url.port || undefined,
      path: `${url.pathname}${url.search}`,
      method: 'POST',
      agent: false,
      lookup: pinned(address),
      timeout: opts.timeoutMs,
      headers: {
        'content-type': 'application/json',
        'content-length': Buffer.byteLength(body),
        'user-agent': 'foldwise-callback',
        [callbackTimeHeader]: String(time),
        [callbackSignatureHeader]: callbackSignature(body, time, opts.key),
      },
    });
    const timer = setTimeout(() => req.destroy(new Error(`no answer within ${opts.timeoutMs} ms`)), opts.timeoutMs);
    req.on('error', (cause) => {
      clearTimeout(timer);
      reject(new FoldwiseError('ERR_UPSTREAM_FAILED', `callback to ${url.host} failed`, { cause }));
    });
    req.on('response', (res) => {
      clearTimeout(timer);
      res.resume();
      const status = res.statusCode ?? 0;
      if (status >= 200 && status < 300) resolve(status);
      else reject(new FoldwiseError('ERR_UPSTREAM_FAILED', `callback to ${url.host} answered ${status}`));
    });
    req.end(body);
  });
}

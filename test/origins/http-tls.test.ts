/**
 * HTTPS upstreams with the address pinned: the origin connects to the checked IP (127.0.0.1)
 * yet sends the host name as TLS SNI (RFC 6066 section 3) and checks the certificate against
 * that name (RFC 6125), so pinning never weakens certificate checking. The certificate is
 * made at test time with the openssl command; without it the suite is skipped, saying so.
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import https from 'node:https';
import type { AddressInfo } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createHttpOrigin } from '../../src/origins/http.js';
import { codeOf, payload } from './upstream-server.js';

function selfSigned(name: string): { key: string; cert: string } | undefined {
  const dir = mkdtempSync(join(tmpdir(), 'fw-tls-'));
  try {
    execFileSync('openssl', [
      'req', '-x509', '-newkey', 'rsa:2048', '-nodes', '-days', '2', '-subj', `/CN=${name}`,
      '-addext', `subjectAltName=DNS:${name}`, '-keyout', join(dir, 'key.pem'), '-out', join(dir, 'cert.pem'),
    ], { stdio: 'ignore' });
    return { key: readFileSync(join(dir, 'key.pem'), 'utf8'), cert: readFileSync(join(dir, 'cert.pem'), 'utf8') };
  } catch {
    return undefined;
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

const pair = selfSigned('pictures.test');
if (!pair) console.warn('http-tls tests skipped: the openssl command is not available to make a certificate');

describe.skipIf(!pair)('https upstream, pinned address', () => {
  let server: https.Server;
  let port = 0;
  const seen: Array<{ sni: string | false | null; host: string | undefined }> = [];

  beforeAll(async () => {
    server = https.createServer({ key: pair!.key, cert: pair!.cert }, (req, res) => {
      seen.push({ sni: (req.socket as import('node:tls').TLSSocket).servername, host: req.headers.host });
      res.writeHead(200, { etag: '"tls-1"' }).end(payload);
    });
    await new Promise<void>((r) => server.listen(0, '127.0.0.1', r));
    port = (server.address() as AddressInfo).port;
  });
  afterAll(() => new Promise<void>((r) => server.close(() => r())));

  const origin = (ca: string | undefined, name = 'pictures.test') =>
    createHttpOrigin({
      allowHosts: [`https://${name}:${port}`],
      allowAddresses: ['127.0.0.1/32'],
      timeouts: { connectMs: 2000, headersMs: 2000, bodyMs: 2000 },
      maxBytes: 1 << 20,
      maxRedirects: 0,
      ca,
      resolve: async () => [{ address: '127.0.0.1', family: 4 }],
    });

  it('connects to the checked address with the real name as SNI and Host', async () => {
    const src = await origin(pair!.cert).read(`pictures.test:${port}/weave.png`);
    expect(src.bytes.equals(payload)).toBe(true);
    expect(src.identity.version).toBe('etag:"tls-1"');
    expect(seen.at(-1)).toEqual({ sni: 'pictures.test', host: `pictures.test:${port}` });
  });

  it('refuses a certificate that does not name the host', async () => {
    expect(await codeOf(origin(pair!.cert, 'other.test').read(`other.test:${port}/weave.png`))).toBe('ERR_UPSTREAM_FAILED');
  });

  it('refuses a certificate from an authority it does not trust', async () => {
    expect(await codeOf(origin(undefined).read(`pictures.test:${port}/weave.png`))).toBe('ERR_UPSTREAM_FAILED');
  });
});

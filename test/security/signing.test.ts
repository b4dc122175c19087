import { createHash } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import {
  canonicalSigningPath,
  canonicalSigningQuery,
  signUrl,
  verifySignature,
} from '../../src/security/signing.js';

/**
 * HMAC written out from its definition, RFC 2104 section 2:
 * H(K XOR opad, H(K XOR ipad, text)), B = 64 bytes for SHA-256 (FIPS 180-4), keys longer
 * than B hashed first. Independent of node:crypto's createHmac, which the service uses.
 */
function referenceHmac(key: string, text: string): Buffer {
  const sha256 = (b: Buffer): Buffer => createHash('sha256').update(b).digest();
  let k: Buffer = Buffer.from(key, 'utf8');
  if (k.length > 64) k = sha256(k);
  const padded = Buffer.concat([k, Buffer.alloc(64 - k.length)]);
  const ipad = padded.map((b) => b ^ 0x36);
  const opad = padded.map((b) => b ^ 0x5c);
  return sha256(Buffer.concat([opad, sha256(Buffer.concat([ipad, Buffer.from(text, 'utf8')]))]));
}

const key = 'weaving-room-key-0001';
const oldKey = 'weaving-room-key-0000';
const path = '/v1/renditions/fabric/herringbone.png';

function query(url: string): URLSearchParams {
  return new URLSearchParams(url.slice(url.indexOf('?') + 1));
}

describe('signing', () => {
  it('the reference HMAC matches RFC 4231 test case 2', () => {
    // RFC 4231 section 4.3: key "Jefe", data "what do ya want for nothing?", HMAC-SHA-256.
    expect(referenceHmac('Jefe', 'what do ya want for nothing?').toString('hex')).toBe(
      '5bdcc146bf60754e6a042426089575c75a003f089d2739839dec58b964ec3843',
    );
  });

  it('signs path + newline + canonical query with HMAC-SHA256, base64url (RFC 4648 section 5)', () => {
    const url = signUrl(path, { width: '320', format: 'webp' }, key);
    const expected = referenceHmac(key, `${path}\nformat=webp&width=320`).toString('base64url');
    expect(url).toBe(`${path}?format=webp&width=320&signature=${expected}`);
    expect(expected).toMatch(/^[A-Za-z0-9_-]{43}$/);
  });

  it('verifies its own URLs, whatever the parameter order or percent-encoding spelling', () => {
    const url = signUrl(path, { width: '320', position: 'left top' }, key);
    const sig = query(url).get('signature') as string;
    expect(verifySignature(path, query(url), [key])).toBe('valid');
    const reordered = new URLSearchParams(`signature=${sig}&position=left%20top&width=320`);
    expect(verifySignature(path, reordered, [key])).toBe('valid');
    const plus = new URLSearchParams(`position=left+top&width=320&signature=${sig}`);
    expect(verifySignature('/v1/renditions/fabric/herringbon%65.png', plus, [key])).toBe('valid');
  });

  it('accepts Fastify-style query objects as well as URLSearchParams', () => {
    const url = signUrl(path, new URLSearchParams('width=640'), key);
    expect(verifySignature(path, { width: '640', signature: query(url).get('signature') as string }, [key])).toBe('valid');
  });

  it('refuses tampered parameters, paths, added parameters and other endpoints', () => {
    const q = query(signUrl(path, { width: '320' }, key));
    const swap = (name: string, value: string): URLSearchParams => {
      const c = new URLSearchParams(q);
      c.set(name, value);
      return c;
    };
    expect(verifySignature(path, swap('width', '3200'), [key])).toBe('invalid');
    expect(verifySignature(path, swap('quality', '100'), [key])).toBe('invalid');
    expect(verifySignature('/v1/renditions/fabric/stripes.png', q, [key])).toBe('invalid');
    expect(verifySignature('/v1/alias-risk/fabric/herringbone.png', q, [key])).toBe('invalid');
    // One segment with an encoded slash is not the same path as two segments.
    expect(verifySignature('/v1/renditions/fabric%2Fherringbone.png', q, [key])).toBe('invalid');
  });

  it('reports a missing signature apart from a bad one', () => {
    expect(verifySignature(path, { width: '320' }, [key])).toBe('missing');
    expect(verifySignature(path, { width: '320', signature: '' }, [key])).toBe('invalid');
    expect(verifySignature(path, { width: '320', signature: 'AAAA' }, [key])).toBe('invalid');
  });

  it('refuses malformed, padded, truncated and repeated signatures', () => {
    const sig = query(signUrl(path, { width: '320' }, key)).get('signature') as string;
    const cases: Array<string | string[]> = [`${sig}=`, sig.slice(0, 42), `${sig}A`, sig.replace(/./, '+'), [sig, sig]];
    for (const signature of cases) {
      expect(verifySignature(path, { width: '320', signature }, [key])).toBe('invalid');
    }
  });

  it('rotation: any listed key verifies, the first signs, an unlisted key fails', () => {
    const byOld = query(signUrl(path, { width: '320' }, oldKey));
    expect(verifySignature(path, byOld, [key, oldKey])).toBe('valid');
    expect(verifySignature(path, byOld, [key])).toBe('invalid');
    expect(verifySignature(path, byOld, [])).toBe('invalid');
  });

  it('canonical forms: sorted by name then value, strict RFC 3986 encoding', () => {
    expect(canonicalSigningQuery(new URLSearchParams('b=2&a=x%20y&a=!&signature=zzz'))).toBe('a=%21&a=x%20y&b=2');
    expect(canonicalSigningQuery({})).toBe('');
    expect(canonicalSigningPath('/v1/renditions/%7Efabric/a%2Fb')).toBe('/v1/renditions/~fabric/a%2Fb');
    expect(canonicalSigningPath('/v1/renditions/%E0%A4%A')).toBeUndefined();
    expect(() => signUrl(path, {}, '')).toThrow(RangeError);
  });
});

import { describe, expect, it } from 'vitest';
import { classifyAddress, createAddressGuard } from '../../src/origins/address-guard.js';
import { inCidr, parseAddress, parseCidr } from '../../src/origins/ip-address.js';

// [address, expected kind, source of the expectation]
const table: Array<[string, string, string]> = [
  ['93.184.216.34', 'public', 'global unicast (RFC 6890: not in the special-purpose registry)'],
  ['8.8.8.8', 'public', 'global unicast (RFC 6890)'],
  ['0.0.0.0', 'reserved', '"this host on this network" (RFC 6890 section 2.2.2)'],
  ['0.1.2.3', 'reserved', '0.0.0.0/8 (RFC 6890)'],
  ['10.0.0.1', 'private', 'RFC 1918'],
  ['10.255.255.255', 'private', 'RFC 1918'],
  ['11.0.0.1', 'public', 'just past 10/8 (RFC 1918)'],
  ['100.64.0.1', 'private', 'CGNAT (RFC 6598)'],
  ['100.127.255.255', 'private', 'CGNAT upper edge (RFC 6598)'],
  ['100.128.0.0', 'public', 'just past 100.64/10 (RFC 6598)'],
  ['127.0.0.1', 'private', 'loopback (RFC 1122 section 3.2.1.3)'],
  ['127.255.255.254', 'private', 'loopback /8 (RFC 1122)'],
  ['169.254.1.1', 'private', 'link-local (RFC 3927)'],
  ['169.254.169.254', 'metadata', 'cloud metadata (common practice)'],
  ['172.16.0.1', 'private', 'RFC 1918'],
  ['172.31.255.255', 'private', 'RFC 1918 upper edge of 172.16/12'],
  ['172.32.0.1', 'public', 'just past 172.16/12 (RFC 1918)'],
  ['192.0.0.8', 'reserved', 'IETF protocol assignments (RFC 6890)'],
  ['192.0.2.1', 'reserved', 'TEST-NET-1 (RFC 5737)'],
  ['192.168.1.1', 'private', 'RFC 1918'],
  ['198.18.0.1', 'reserved', 'benchmarking (RFC 2544)'],
  ['198.51.100.7', 'reserved', 'TEST-NET-2 (RFC 5737)'],
  ['203.0.113.9', 'reserved', 'TEST-NET-3 (RFC 5737)'],
  ['224.0.0.1', 'reserved', 'multicast (RFC 5771)'],
  ['239.255.255.250', 'reserved', 'multicast (RFC 5771)'],
  ['255.255.255.255', 'reserved', 'limited broadcast (RFC 919)'],
  ['::', 'reserved', 'unspecified (RFC 4291 section 2.5.2)'],
  ['::1', 'private', 'loopback (RFC 4291 section 2.5.3)'],
  ['0:0:0:0:0:0:0:1', 'private', 'loopback, uncompressed form (RFC 4291 section 2.2)'],
  ['2606:4700::1111', 'public', 'global unicast (RFC 4291 section 2.5.4)'],
  ['fe80::1%eth0', 'private', 'link-local with a zone (RFC 4291, RFC 4007)'],
  ['fc00::1', 'private', 'unique-local (RFC 4193)'],
  ['fd12:3456::1', 'private', 'unique-local (RFC 4193)'],
  ['fd00:ec2::254', 'metadata', 'cloud metadata over IPv6 (from memory)'],
  ['fec0::1', 'reserved', 'site-local, deprecated (RFC 3879)'],
  ['ff02::1', 'reserved', 'multicast (RFC 4291 section 2.7)'],
  ['2001:db8::1', 'reserved', 'documentation (RFC 3849)'],
  ['100::1', 'reserved', 'discard-only (RFC 6666)'],
  ['::ffff:127.0.0.1', 'private', 'IPv4-mapped loopback (RFC 4291 section 2.5.5.2)'],
  ['::ffff:7f00:1', 'private', 'IPv4-mapped loopback in hex groups (RFC 4291 section 2.5.5.2)'],
  ['::ffff:169.254.169.254', 'metadata', 'IPv4-mapped metadata address'],
  ['::ffff:10.1.2.3', 'private', 'IPv4-mapped RFC 1918'],
  ['::ffff:8.8.8.8', 'public', 'IPv4-mapped public address'],
  ['::ffff:0:10.0.0.1', 'private', 'IPv4-translated (RFC 2765)'],
  ['::10.0.0.1', 'reserved', 'IPv4-compatible, deprecated (RFC 4291 section 2.5.5.1)'],
  ['64:ff9b::7f00:1', 'private', 'NAT64 well-known prefix carrying 127.0.0.1 (RFC 6052 section 2.1)'],
  ['64:ff9b::169.254.169.254', 'metadata', 'NAT64 carrying the metadata address (RFC 6052)'],
  ['64:ff9b::8.8.8.8', 'public', 'NAT64 carrying a public address (RFC 6052)'],
  ['64:ff9b:1::a00:1', 'reserved', 'local-use translation prefix (RFC 8215)'],
  ['2002:0a00:0001::1', 'private', '6to4 carrying 10.0.0.1 (RFC 3056 section 2)'],
  ['2002:7f00:1::', 'private', '6to4 carrying 127.0.0.1 (RFC 3056)'],
  ['2002:0808:0808::1', 'public', '6to4 carrying 8.8.8.8 (RFC 3056)'],
  ['2001:0:4136:e378:8000:63bf:80ff:fffe', 'private', 'Teredo, client 127.0.0.1 inverted (RFC 4380 section 4)'],
  ['localhost', 'reserved', 'not an IP literal'],
  ['0x7f.0.0.1', 'reserved', 'hex dotted form is not accepted (common practice: filter bypass)'],
  ['0177.0.0.1', 'reserved', 'octal dotted form is not accepted (common practice: filter bypass)'],
  ['2130706433', 'reserved', 'integer form of 127.0.0.1 is not accepted (common practice)'],
  ['1.2.3.4.5', 'reserved', 'too many parts'],
  ['1::2::3', 'reserved', 'two :: (RFC 4291 section 2.2)'],
];

describe('address guard', () => {
  it.each(table)('%s is %s (%s)', (address, kind) => {
    expect(classifyAddress(address).kind).toBe(kind);
  });

  it('says which range decided', () => {
    expect(classifyAddress('10.0.0.1').range).toContain('RFC 1918');
    expect(classifyAddress('::ffff:192.168.0.1').range).toMatch(/IPv4-mapped.*192\.168\.0\.1.*RFC 1918/);
  });

  it('refuses everything but public addresses by default', () => {
    const guard = createAddressGuard();
    expect(guard.check('8.8.8.8').allowed).toBe(true);
    for (const a of ['127.0.0.1', '::1', '10.0.0.1', '169.254.169.254', 'ff02::1', '::ffff:127.0.0.1']) {
      expect(guard.check(a).allowed, a).toBe(false);
    }
  });

  it('allowPrivate lets private ranges through, never metadata or reserved ranges', () => {
    const guard = createAddressGuard({ allowPrivate: true });
    for (const a of ['127.0.0.1', '::1', '10.0.0.1', 'fd12::1', '100.64.0.1']) expect(guard.check(a).allowed, a).toBe(true);
    for (const a of ['169.254.169.254', 'fd00:ec2::254', '::ffff:169.254.169.254', '224.0.0.1', '0.0.0.0', '::']) {
      expect(guard.check(a).allowed, a).toBe(false);
    }
  });

  it('an explicit allow list admits just its blocks', () => {
    const guard = createAddressGuard({ allowAddresses: ['127.0.0.1/32', '10.20.0.0/16'] });
    expect(guard.check('127.0.0.1').allowed).toBe(true);
    expect(guard.check('127.0.0.2').allowed).toBe(false);
    expect(guard.check('10.20.3.4').allowed).toBe(true);
    expect(guard.check('10.21.0.1').allowed).toBe(false);
    expect(createAddressGuard({ allowAddresses: ['169.254.0.0/16'] }).check('169.254.169.254').allowed).toBe(false);
  });

  it('CIDR matching follows prefix boundaries (RFC 4632 section 3.1)', () => {
    const block = parseCidr('172.16.0.0/12');
    expect(inCidr(parseAddress('172.31.0.0')!, block)).toBe(true);
    expect(inCidr(parseAddress('172.32.0.0')!, block)).toBe(false);
    expect(inCidr(parseAddress('::ffff:172.16.0.1')!, block)).toBe(false); // families never mix
    expect(() => parseCidr('10.0.0.0/33')).toThrow(RangeError);
    expect(() => parseCidr('nonsense')).toThrow(RangeError);
  });
});

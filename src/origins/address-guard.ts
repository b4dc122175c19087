/**
 * Which IP addresses an upstream fetch may connect to. Every address a host resolves to is
 * classified; only `public` ones pass by default. IPv6 forms that embed an IPv4 address
 * (mapped, translated, NAT64, 6to4, Teredo) are judged by the address they carry, so a
 * private IPv4 cannot hide inside an IPv6 literal.
 */
import { formatIPv4, inCidr, parseAddress, parseCidr, type Cidr, type ParsedAddress } from './ip-address.js';

export type AddressKind = 'public' | 'private' | 'reserved' | 'metadata';

export interface AddressVerdict {
  kind: AddressKind;
  /** The range that decided, e.g. "10.0.0.0/8 private-use (RFC 1918)". */
  range: string;
}

interface Range {
  block: Cidr;
  kind: Exclude<AddressKind, 'public'>;
  label: string;
}

const table = (rows: Array<[string, Range['kind'], string]>): Range[] =>
  rows.map(([cidr, kind, label]) => ({ block: parseCidr(cidr), kind, label: `${cidr} ${label}` }));

// Cloud instance-metadata endpoints: never reachable, whatever else is allowed.
const metadata = table([
  ['169.254.169.254/32', 'metadata', 'instance metadata (common practice: AWS, GCP, Azure)'],
  ['169.254.170.2/32', 'metadata', 'container task metadata (from memory: AWS ECS)'],
  ['100.100.100.200/32', 'metadata', 'instance metadata (from memory: Alibaba Cloud)'],
  ['fd00:ec2::254/128', 'metadata', 'instance metadata over IPv6 (from memory: AWS)'],
]);

// IPv4 special-purpose registry, RFC 6890 section 2.2.2, plus later additions as cited.
const v4 = table([
  ['0.0.0.0/8', 'reserved', '"this network" (RFC 791, RFC 6890)'],
  ['10.0.0.0/8', 'private', 'private-use (RFC 1918)'],
  ['100.64.0.0/10', 'private', 'shared address space, CGNAT (RFC 6598)'],
  ['127.0.0.0/8', 'private', 'loopback (RFC 1122)'],
  ['169.254.0.0/16', 'private', 'link-local (RFC 3927)'],
  ['172.16.0.0/12', 'private', 'private-use (RFC 1918)'],
  ['192.0.0.0/24', 'reserved', 'IETF protocol assignments (RFC 6890)'],
  ['192.0.2.0/24', 'reserved', 'documentation TEST-NET-1 (RFC 5737)'],
  ['192.88.99.0/24', 'reserved', '6to4 relay anycast (RFC 7526)'],
  ['192.168.0.0/16', 'private', 'private-use (RFC 1918)'],
  ['198.18.0.0/15', 'reserved', 'benchmarking (RFC 2544)'],
  ['198.51.100.0/24', 'reserved', 'documentation TEST-NET-2 (RFC 5737)'],
  ['203.0.113.0/24', 'reserved', 'documentation TEST-NET-3 (RFC 5737)'],
  ['224.0.0.0/4', 'reserved', 'multicast (RFC 5771)'],
  ['240.0.0.0/4', 'reserved', 'reserved, incl. limited broadcast 255.255.255.255 (RFC 1112, RFC 919)'],
]);

// IPv6 special-purpose registry, RFC 6890 section 2.2.3, plus later additions as cited.
const v6 = table([
  ['::/128', 'reserved', 'unspecified (RFC 4291)'],
  ['::1/128', 'private', 'loopback (RFC 4291)'],
  ['::/96', 'reserved', 'IPv4-compatible, deprecated (RFC 4291 section 2.5.5.1)'],
  ['64:ff9b:1::/48', 'reserved', 'local-use IPv4/IPv6 translation (RFC 8215)'],
  ['100::/64', 'reserved', 'discard-only (RFC 6666)'],
  ['2001::/23', 'reserved', 'IETF protocol assignments (RFC 2928, RFC 6890)'],
  ['2001:db8::/32', 'reserved', 'documentation (RFC 3849)'],
  ['3fff::/20', 'reserved', 'documentation (RFC 9637)'],
  ['fc00::/7', 'private', 'unique-local (RFC 4193)'],
  ['fe80::/10', 'private', 'link-local (RFC 4291)'],
  ['fec0::/10', 'reserved', 'site-local, deprecated (RFC 3879)'],
  ['ff00::/8', 'reserved', 'multicast (RFC 4291)'],
]);

// IPv6 prefixes whose low or fixed bytes carry an IPv4 address: [block, byte offset, xor].
const carriers: Array<[Cidr, number, number, string]> = [
  [parseCidr('::ffff:0:0/96'), 12, 0, 'IPv4-mapped (RFC 4291 section 2.5.5.2)'],
  [parseCidr('::ffff:0:0:0/96'), 12, 0, 'IPv4-translated (RFC 2765)'],
  [parseCidr('64:ff9b::/96'), 12, 0, 'NAT64 well-known prefix (RFC 6052)'],
  [parseCidr('2002::/16'), 2, 0, '6to4 (RFC 3056)'],
  // Teredo: the client's IPv4 is the last 32 bits inverted (RFC 4380 section 4).
  [parseCidr('2001::/32'), 12, 0xff, 'Teredo client (RFC 4380)'],
  [parseCidr('2001::/32'), 4, 0, 'Teredo server (RFC 4380)'],
];

function firstMatch(addr: ParsedAddress, ranges: Range[]): Range | undefined {
  return ranges.find((r) => inCidr(addr, r.block));
}

function classifyV4(addr: ParsedAddress): AddressVerdict {
  const hit = firstMatch(addr, metadata) ?? firstMatch(addr, v4);
  return hit ? { kind: hit.kind, range: hit.label } : { kind: 'public', range: 'global unicast' };
}

/** Classifies one IP literal; text that is not an IP address is `reserved` (never connected). */
export function classifyAddress(text: string): AddressVerdict {
  const addr = parseAddress(text);
  if (!addr) return { kind: 'reserved', range: 'not an IP address' };
  if (addr.family === 4) return classifyV4(addr);
  const meta = firstMatch(addr, metadata);
  if (meta) return { kind: meta.kind, range: meta.label };
  for (const [block, offset, xor, label] of carriers) {
    if (!inCidr(addr, block)) continue;
    const inner = addr.bytes.slice(offset, offset + 4).map((b) => b ^ xor);
    const verdict = classifyV4({ family: 4, bytes: inner });
    if (verdict.kind !== 'public') {
      return { kind: verdict.kind, range: `${label} carrying ${formatIPv4(inner)}: ${verdict.range}` };
    }
  }
  // Longest match wins inside the v6 table (e.g. ::1/128 before ::/96, 2001:db8::/32 too).
  const hits = v6.filter((r) => inCidr(addr, r.block)).sort((a, b) => b.block.prefix - a.block.prefix);
  if (hits.length > 0) return { kind: hits[0].kind, range: hits[0].label };
  const mapped = carriers.find(([block]) => inCidr(addr, block));
  return { kind: 'public', range: mapped ? `${mapped[3]}, public` : 'global unicast' };
}

/** What an upstream may connect to besides public addresses. */
export interface AddressPolicy {
  /** Let private, loopback, link-local, unique-local and CGNAT addresses through. */
  allowPrivate?: boolean;
  /** CIDR blocks (or single addresses) always allowed, e.g. ["127.0.0.1/32"]. */
  allowAddresses?: string[];
}

export interface AddressGuard {
  check(address: string): { allowed: boolean; verdict: AddressVerdict };
}

/**
 * Compiles a policy once. Metadata endpoints are refused even when allowed by a broader
 * rule: there is no legitimate image behind them, and they hand out credentials.
 */
export function createAddressGuard(policy: AddressPolicy = {}): AddressGuard {
  const allowed = (policy.allowAddresses ?? []).map(parseCidr);
  return {
    check(address) {
      const verdict = classifyAddress(address);
      if (verdict.kind === 'metadata') return { allowed: false, verdict };
      if (verdict.kind === 'public') return { allowed: true, verdict };
      if (verdict.kind === 'private' && policy.allowPrivate) return { allowed: true, verdict };
      const addr = parseAddress(address);
      const listed = addr !== undefined && allowed.some((block) => inCidr(addr, block));
      return { allowed: listed, verdict };
    },
  };
}

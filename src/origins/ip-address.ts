/**
 * IP address parsing to bytes, and CIDR matching on those bytes. Pure: no DNS, no sockets.
 * IPv4 is 4 bytes (RFC 791), IPv6 16 bytes (RFC 4291 section 2.2 text forms, including
 * `::` compression, an embedded dotted quad and a `%zone` suffix, which is dropped).
 */

export interface ParsedAddress {
  family: 4 | 6;
  bytes: Uint8Array;
}

export interface Cidr {
  family: 4 | 6;
  bytes: Uint8Array;
  prefix: number;
}

function parseIPv4(text: string): Uint8Array | undefined {
  const parts = text.split('.');
  if (parts.length !== 4) return undefined;
  const out = new Uint8Array(4);
  for (let i = 0; i < 4; i++) {
    // Strict dotted-decimal only: no octal (010), hex (0x7f) or short forms (127.1), which
    // some resolvers accept and which have been used to slip past naive filters.
    if (!/^(0|[1-9][0-9]{0,2})$/.test(parts[i])) return undefined;
    const v = Number(parts[i]);
    if (v > 255) return undefined;
    out[i] = v;
  }
  return out;
}

function parseIPv6(input: string): Uint8Array | undefined {
  let text = input;
  const zone = text.indexOf('%');
  if (zone >= 0) text = text.slice(0, zone);
  if (text.startsWith('[') && text.endsWith(']')) text = text.slice(1, -1);
  if (!/^[0-9a-fA-F:.]+$/.test(text)) return undefined;
  const halves = text.split('::');
  if (halves.length > 2) return undefined;
  const toGroups = (part: string): number[] | undefined => {
    if (part === '') return [];
    const groups: number[] = [];
    const pieces = part.split(':');
    for (let i = 0; i < pieces.length; i++) {
      const piece = pieces[i];
      if (i === pieces.length - 1 && piece.includes('.')) {
        const v4 = parseIPv4(piece);
        if (!v4) return undefined;
        groups.push((v4[0] << 8) | v4[1], (v4[2] << 8) | v4[3]);
      } else {
        if (!/^[0-9a-fA-F]{1,4}$/.test(piece)) return undefined;
        groups.push(parseInt(piece, 16));
      }
    }
    return groups;
  };
  const head = toGroups(halves[0]);
  const tail = halves.length === 2 ? toGroups(halves[1]) : [];
  if (!head || !tail) return undefined;
  if (halves.length === 1 && head.length !== 8) return undefined;
  if (halves.length === 2 && head.length + tail.length > 7) return undefined;
  const groups = [...head, ...new Array(8 - head.length - tail.length).fill(0), ...tail];
  const out = new Uint8Array(16);
  for (let i = 0; i < 8; i++) {
    out[2 * i] = groups[i] >> 8;
    out[2 * i + 1] = groups[i] & 0xff;
  }
  return out;
}

/** Parses an IPv4 or IPv6 literal; undefined when it is neither. */
export function parseAddress(text: string): ParsedAddress | undefined {
  const v4 = parseIPv4(text);
  if (v4) return { family: 4, bytes: v4 };
  const v6 = text.includes(':') ? parseIPv6(text) : undefined;
  return v6 ? { family: 6, bytes: v6 } : undefined;
}

/** Parses `address/prefix` (or a bare address, meaning a single host). Throws on bad input. */
export function parseCidr(text: string): Cidr {
  const slash = text.lastIndexOf('/');
  const addr = parseAddress(slash >= 0 ? text.slice(0, slash) : text);
  if (!addr) throw new RangeError(`not an IP address or CIDR block: ${text}`);
  const max = addr.family === 4 ? 32 : 128;
  const prefix = slash >= 0 ? Number(text.slice(slash + 1)) : max;
  if (!Number.isInteger(prefix) || prefix < 0 || prefix > max) {
    throw new RangeError(`bad prefix length in ${text}`);
  }
  return { family: addr.family, bytes: addr.bytes, prefix };
}

/** True when `addr` lies in `block` (same family only). */
export function inCidr(addr: ParsedAddress, block: Cidr): boolean {
  if (addr.family !== block.family) return false;
  const full = block.prefix >> 3;
  for (let i = 0; i < full; i++) if (addr.bytes[i] !== block.bytes[i]) return false;
  const rest = block.prefix & 7;
  if (rest === 0) return true;
  const mask = (0xff << (8 - rest)) & 0xff;
  return (addr.bytes[full] & mask) === (block.bytes[full] & mask);
}

/** Dotted-quad text of four bytes. */
export function formatIPv4(bytes: Uint8Array): string {
  return `${bytes[0]}.${bytes[1]}.${bytes[2]}.${bytes[3]}`;
}

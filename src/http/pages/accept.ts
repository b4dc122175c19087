/**
 * Whether a client would rather read an HTML page than JSON, from its Accept header
 * (RFC 9110, section 12.5.1: media ranges with q weights; the most specific range decides).
 */

interface Range {
  type: string;
  subtype: string;
  q: number;
}

function parse(accept: string): Range[] {
  const out: Range[] = [];
  for (const part of accept.split(',')) {
    const [media, ...params] = part.split(';').map((s) => s.trim().toLowerCase());
    const [type, subtype] = (media ?? '').split('/');
    if (!type || !subtype) continue;
    const qParam = params.find((p) => p.startsWith('q='));
    const q = qParam ? Number(qParam.slice(2)) : 1;
    out.push({ type, subtype, q: Number.isFinite(q) ? Math.min(1, Math.max(0, q)) : 0 });
  }
  return out;
}

/** The weight the header gives `media` (type/subtype): the most specific matching range's q. */
function weight(ranges: Range[], media: string): number {
  const [type, subtype] = media.split('/');
  let best = -1;
  let q = 0;
  for (const r of ranges) {
    const specificity = r.type === type && r.subtype === subtype ? 2 : r.type === type && r.subtype === '*' ? 1 : r.type === '*' ? 0 : -1;
    if (specificity > best) {
      best = specificity;
      q = r.q;
    }
  }
  return q;
}

/**
 * True when the header weighs text/html above both JSON forms. Browsers navigating send
 * `text/html,...,*\/*;q=0.8` (true); curl and fetch send `*\/*`, image requests `image/...,*\/*`
 * (false: a tie or no html goes to the machine-readable form).
 */
export function prefersHtml(accept: string | undefined): boolean {
  if (!accept) return false;
  const ranges = parse(accept);
  const html = weight(ranges, 'text/html');
  return html > 0 && html > Math.max(weight(ranges, 'application/problem+json'), weight(ranges, 'application/json'));
}

/**
 * The fixed request set of the behaviour-preservation harness: every endpoint over the demo
 * pictures. Order matters (the first request of a rendition is a miss, a repeat a hit, and a
 * conditional request reuses the ETag of the request it names), so the set is a list.
 */
export interface GoldenRequest {
  /** Stable name; also the key in test/golden/responses.json. */
  name: string;
  method: 'GET' | 'POST';
  url: string;
  headers?: Record<string, string>;
  /** A JSON body, or a demo picture's bytes ({ file: path under the source folder }). */
  body?: { json: unknown } | { file: string };
  /** Sends If-None-Match with the ETag that the named earlier request answered with. */
  ifNoneMatchOf?: string;
  /** Record status and content type only: the body is a live figure (metrics). */
  volatileBody?: boolean;
}

const sources = [
  'fabrics/twill.jpg',
  'fabrics/pinstripe.png',
  'fabrics/herringbone.jpg',
  'fabrics/gingham.png',
  'shop/brick-front.jpg',
  'labels/care-label.png',
  'products/scarf.png',
] as const;
const three = ['fabrics/pinstripe.png', 'shop/brick-front.jpg', 'products/scarf.png'] as const;
const kernels = ['auto', 'bandlimit', 'lanczos-3', 'lanczos-2', 'catmull-rom', 'mitchell-netravali', 'gaussian', 'triangle', 'box', 'nearest-neighbour'];

function get(url: string, extra: Partial<GoldenRequest> = {}): GoldenRequest {
  return { name: `GET ${url}`, method: 'GET', url, ...extra };
}

function renditions(): GoldenRequest[] {
  const out: GoldenRequest[] = [];
  const r = (source: string, query: string): string => `/v1/renditions/${source}?${query}`;
  for (const s of sources) {
    for (const width of [96, 320]) for (const format of ['png', 'jpeg', 'webp']) out.push(get(r(s, `width=${width}&format=${format}`)));
    out.push(get(r(s, 'width=96&format=avif')));
    for (const fit of ['contain', 'cover', 'fill', 'scale-down']) out.push(get(r(s, `width=200&height=200&fit=${fit}&format=png`)));
    out.push(get(r(s, 'width=200&height=200&format=png'))); // the default fit (contain)
    out.push(get(r(s, 'width=4000&fit=scale-down&format=jpeg')));
    for (const kernel of kernels) out.push(get(r(s, `width=150&kernel=${kernel}&format=png`)));
    out.push(get(r(s, 'width=150&light=encoded&format=png')));
  }
  for (const s of three) {
    for (const density of ['0.5', '1', '1.5', '2', '3']) out.push(get(r(s, `width=120&density=${density}&format=png`)));
    for (const position of ['left top', 'right bottom', '30% 70%', 'center', '100% 0%']) {
      out.push(get(r(s, `width=160&height=90&fit=cover&position=${encodeURIComponent(position)}&format=png`)));
    }
    out.push(get(r(s, 'width=160&height=160&fit=contain&position=left&format=png')));
    for (const prefilter of ['none', '0.8', '2.5']) out.push(get(r(s, `width=180&prefilter=${prefilter}&format=png`)));
    out.push(get(r(s, 'height=140&format=webp')));
  }
  for (const quality of [40, 90]) for (const s of ['fabrics/twill.jpg', 'labels/care-label.png']) out.push(get(r(s, `width=256&quality=${quality}&format=jpeg`)));
  for (const background of ['%23334455', 'abc']) out.push(get(r('products/scarf.png', `width=200&height=120&fit=contain&background=${background}&format=jpeg`)));
  for (const s of ['fabrics/gingham.png', 'products/scarf.png']) {
    for (const accept of ['image/avif,image/webp,*/*', 'image/webp,*/*', 'image/png', '*/*']) {
      out.push({ ...get(r(s, 'width=128')), name: `GET ${r(s, 'width=128')} Accept: ${accept}`, headers: { accept } });
    }
  }
  // A repeat (a cache hit: the same bytes and headers) and a conditional request (304).
  const first = get(r('fabrics/twill.jpg', 'width=96&format=png'));
  out.push({ ...first, name: `${first.name} (again)` });
  out.push({ ...first, name: `${first.name} If-None-Match`, ifNoneMatchOf: first.name });
  return out;
}

function aliasRisk(): GoldenRequest[] {
  const out: GoldenRequest[] = [];
  for (const s of sources) for (const width of [200, 640]) out.push(get(`/v1/alias-risk/${s}?width=${width}`));
  for (const s of three) for (const view of ['map', 'spectrum']) out.push(get(`/v1/alias-risk/${s}?width=240&view=${view}`));
  out.push(get('/v1/alias-risk/fabrics/herringbone.jpg?width=300&prefilter=none&kernel=lanczos-3'));
  return out;
}

function errors(): GoldenRequest[] {
  const base = '/v1/renditions/fabrics/twill.jpg';
  const bad = [
    `${base}?width=0`,
    `${base}?width=abc`,
    `${base}?width=100&width=200`,
    `${base}?fit=stretch`,
    `${base}?format=gif`,
    `${base}?kernel=sinc`,
    // Earlier spellings: a 400 naming the new one.
    `${base}?width=100&kernel=lanczos3`,
    `${base}?width=100&kernel=lanczos2`,
    `${base}?width=100&kernel=mitchell`,
    `${base}?width=100&kernel=nearest`,
    `${base}?width=100&format=auto`,
    `${base}?position=middle`,
    `${base}?background=red`,
    `${base}?prefilter=99`,
    `${base}?density=9`,
    `${base}?colour=blue`,
    '/v1/renditions/fabrics/missing.jpg?width=100',
    '/v1/renditions/..%2F..%2Fetc%2Fpasswd?width=100',
    '/v1/alias-risk/fabrics/twill.jpg?view=heat',
    '/v1/ingest/jobs/no-such-job',
    '/no/such/route',
  ];
  const out = bad.map((url) => get(url));
  out.push({ name: 'POST /v1/ingest text/plain', method: 'POST', url: '/v1/ingest', headers: { 'content-type': 'text/plain' }, body: { json: 'a price list' } });
  out.push({ name: 'POST /v1/ingest missing source', method: 'POST', url: '/v1/ingest', body: { json: { source: 'fabrics/missing.png' } } });
  return out;
}

/** The whole set, in the order it is sent. */
export function goldenRequests(): GoldenRequest[] {
  return [
    get('/healthz'),
    get('/readyz'),
    get('/v1/sources'),
    get('/'),
    get('/docs'),
    get('/docs/openapi.json'),
    get('/docs/errors'),
    get('/docs/errors.json'),
    get('/inspect'),
    ...renditions(),
    ...aliasRisk(),
    { name: 'POST /v1/ingest {source}', method: 'POST', url: '/v1/ingest?widths=160,320', body: { json: { source: 'labels/care-label.png' } } },
    { name: 'POST /v1/ingest bytes', method: 'POST', url: '/v1/ingest?widths=120,240', headers: { 'content-type': 'image/png' }, body: { file: 'fabrics/gingham.png' } },
    ...errors(),
    get('/metrics', { volatileBody: true }),
  ];
}

/**
 * The start page (GET /): what foldwise is, where everything is, a form that opens any source
 * in the inspector, and the demo shop's pictures as live renditions with their links.
 */
import { aliasRiskPrefix, renditionsPrefix } from '../../schemas/paths.js';
import { encodePath, esc, page } from './html.js';

export interface HomeFacts {
  version: string;
  /** Source paths from the folder origin; undefined when listing is switched off. */
  sources?: string[];
  /** Rendition URLs need a signature: no live pictures, no working links to hand out. */
  signed: boolean;
  /** Scheme, host and port the browser used, for the examples. */
  origin: string;
}

/** Tiles are 240 x 160 CSS px, cropped to fill (fit=cover), with a 2x candidate. */
const tile = { width: 240, height: 160 };
/** The picture the form starts on: the inspector's own first picture, where the difference shows most. */
const firstChoice = 'fabrics/pinstripe.png';
/** The most pictures the shelf shows; the listing has the rest. */
const shelfMax = 48;

const places: Array<[string, string, string]> = [
  ['/inspect', 'Inspector', 'a rendition beside the naive one, with its alias risk'],
  ['/docs', 'API reference', 'every endpoint and parameter'],
  ['/docs/errors', 'Error codes', 'what each problem code means'],
  ['/v1/sources', 'Sources', 'the folder origin\u2019s pictures (JSON)'],
  ['/healthz', 'Health', 'liveness; /readyz for readiness'],
  ['/metrics', 'Metrics', 'Prometheus text'],
  ['/docs/openapi.json', 'OpenAPI document', 'the machine-readable API (JSON)'],
];

function tryForm(sources: string[]): string {
  const options = sources.map((s) => `<option${s === firstChoice ? ' selected' : ''}>${esc(s)}</option>`).join('');
  const field = sources.length > 0
    ? `<label>Picture <select name="source">${options}</select></label>`
    : '<label>Source path <input name="source" required placeholder="fabrics/twill.png"></label>';
  return `    <h2 id="try">Try a rendition</h2>
    <p>Pick a picture and a width: the inspector renders it, shows the naive copy beside it and tells how likely a viewer is to see false patterns.</p>
    <form class="try" method="get" action="/inspect">
      ${field}
      <label>Width (CSS px) <input name="width" type="number" min="1" value="320"></label>
      <button type="submit">Inspect</button>
    </form>
`;
}

/** The URLs of a picture's tile on the start page: the 1x `src` and the 2x candidate. */
export function tileUrls(path: string): [string, string] {
  const thumb = `${renditionsPrefix}${encodePath(path)}?width=${tile.width}&height=${tile.height}&fit=cover`;
  return [thumb, `${thumb}&density=2`];
}

/** The pictures the shelf shows, in its order. */
export const shelfSources = (sources: string[]) => sources.slice(0, shelfMax);

function shelfItem(path: string): string {
  const base = `${renditionsPrefix}${encodePath(path)}`;
  const risk = `${aliasRiskPrefix}${encodePath(path)}`;
  const [thumb, thumb2x] = tileUrls(path);
  const inspect = `/inspect?source=${encodePath(path)}&width=320`;
  return `      <li>
        <a href="${esc(inspect)}"><img src="${esc(thumb)}" srcset="${esc(thumb2x)} 2x" width="${tile.width}" height="${tile.height}" loading="lazy" decoding="async" alt="${esc(path)}"></a>
        <div class="about">
          <div class="name">${esc(path)}</div>
          <div class="acts">
            <a href="${esc(`${base}?width=480`)}">480 px</a>
            <a href="${esc(`${risk}?width=480`)}">risk</a>
            <a href="${esc(`${risk}?width=480&view=map`)}">risk map</a>
            <a href="${esc(inspect)}">inspect</a>
          </div>
        </div>
      </li>`;
}

function shelf(f: HomeFacts): string {
  if (!f.sources) return '    <p class="note">Listing sources is switched off (<code>origin.listing</code>), so no pictures are shown here.</p>\n';
  if (f.signed) {
    return `    <p class="note">Signing is on: rendition and alias-risk URLs need a signature, so this page shows no live pictures. Sign a URL with <code>foldwise sign &lt;url&gt;</code> (see <a href="/docs">the reference</a>).</p>
    <ul>${f.sources.slice(0, shelfMax).map((s) => `<li><code>${esc(s)}</code></li>`).join('')}</ul>\n`;
  }
  if (f.sources.length === 0) return '    <p class="note">The source folder has no pictures yet. Put images in it, or start with the demo pictures on (<code>origin.generateDemo</code>).</p>\n';
  const more = f.sources.length > shelfMax ? `<p class="muted">${f.sources.length - shelfMax} more in <a href="/v1/sources">/v1/sources</a>.</p>` : '';
  return `    <p>Each tile is a rendition made now, ${tile.width} \u00d7 ${tile.height} CSS px, cropped to fill (<code>fit=cover</code>), with a <code>density=2</code> candidate for sharper screens.</p>
    <ul class="shelf">
${shelfSources(f.sources).map(shelfItem).join('\n')}
    </ul>
    ${more}\n`;
}

export function homePage(f: HomeFacts): string {
  const example = f.sources?.[0] ?? 'fabrics/twill.png';
  const body = `    <ul class="links">
${places.map(([href, label, about]) => `      <li><a href="${href}">${esc(label)}</a><span>${esc(about)}</span></li>`).join('\n')}
    </ul>
${f.signed ? '' : tryForm(f.sources ?? [])}    <h2 id="pictures">The demo shop\u2019s pictures</h2>
${shelf(f)}    <h2 id="use">From a page or a shell</h2>
    <pre>${esc(`<img src="${renditionsPrefix}${encodePath(example)}?width=480" width="480" alt="\u2026">`)}

curl -s '${esc(`${f.origin}${aliasRiskPrefix}${encodePath(example)}?width=480`)}'   # its alias risk, before rendering
npx foldwise render path/to/picture.png --width 480 -o picture-480.webp   # the same, without a server</pre>
    <p class="muted">foldwise ${esc(f.version)}</p>
`;
  return page({
    title: 'foldwise',
    current: '/',
    lede: 'Image renditions made correctly: resampled in linear light, with a Gaussian prefilter chosen from the scale, and the alias risk of any request known before you cache it.',
    body,
  });
}

/**
 * The frame every server-made page shares: escaping, the document shell with the site's
 * masthead and navigation, and the headers a page is sent with. Pages are strings built from
 * escaped parts; nothing here runs in the browser.
 */
import type { FastifyReply } from 'fastify';

const entities: Record<string, string> = { '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' };

/** Text for an HTML body or a quoted attribute. */
export const esc = (text: string | number): string => String(text).replace(/[&<>"']/g, (c) => entities[c] ?? c);

/** A path under the origin, each segment percent-encoded, the slashes kept. */
export const encodePath = (path: string): string => path.split('/').map(encodeURIComponent).join('/');

/** The site's navigation: label and href; the current page is marked for screen readers. */
const nav: Array<[string, string]> = [
  ['Start', '/'],
  ['Inspector', '/inspect'],
  ['API reference', '/docs'],
  ['Error codes', '/docs/errors'],
];

export interface PageFrame {
  title: string;
  /** The href of the navigation entry this page is, if any. */
  current?: string;
  /** One line under the title. */
  lede?: string;
  body: string;
}

/** A whole HTML document in the site's frame. */
export function page(p: PageFrame): string {
  const links = nav
    .map(([label, href]) => `<a href="${href}"${href === p.current ? ' aria-current="page"' : ''}>${esc(label)}</a>`)
    .join('\n        ');
  return `<!doctype html>
<html lang="en">
<head>
  <meta charset="utf-8">
  <meta name="viewport" content="width=device-width, initial-scale=1">
  <title>${esc(p.title)}</title>
  <link rel="icon" href="/inspect/assets/icon.svg" type="image/svg+xml">
  <link rel="stylesheet" href="/assets/site.css">
</head>
<body>
  <header class="band">
    <div class="frame">
      <a class="mark" href="/"><img src="/inspect/assets/icon.svg" alt="" width="22" height="22"> foldwise</a>
      <nav aria-label="Site">
        ${links}
      </nav>
    </div>
  </header>
  <main class="frame" id="main">
    <h1>${esc(p.title)}</h1>
${p.lede ? `    <p class="lede">${p.lede}</p>\n` : ''}${p.body}
  </main>
</body>
</html>
`;
}

/**
 * Server-made pages load their stylesheet and images from this service only, run no script,
 * and submit forms only here.
 */
export const pagePolicy = [
  "default-src 'none'",
  "style-src 'self'",
  "img-src 'self'",
  "form-action 'self'",
  "base-uri 'none'",
  "frame-ancestors 'none'",
].join('; ');

/** Sets the headers of an HTML page (type, policy, no sniffing) on `reply`. */
export function asPage(reply: FastifyReply): FastifyReply {
  return reply
    .type('text/html; charset=utf-8')
    .header('content-security-policy', pagePolicy)
    .header('x-content-type-options', 'nosniff')
    .header('referrer-policy', 'no-referrer');
}

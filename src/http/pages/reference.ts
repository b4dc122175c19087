/**
 * GET /docs: the API reference, drawn in the browser by Swagger UI (the `swagger-ui-dist`
 * package) from GET /docs/openapi.json. Every file the page loads is served by this process
 * under /docs/assets/ (src/http/routes/docs-assets.ts); nothing comes from elsewhere.
 * Our part is the frame below, a start script (a file, so the page needs no inline script)
 * and a few lines of CSS in the site's palette over the package's own stylesheet.
 */
import { esc } from './html.js';

/** The page's shell: our masthead, the package's stylesheet and bundle, our start script. */
export const referencePage = (version: string): string => `<!doctype html>
<html lang="en">
<head>
  <meta charset="utf-8">
  <meta name="viewport" content="width=device-width, initial-scale=1">
  <title>API reference</title>
  <link rel="icon" href="/inspect/assets/icon.svg" type="image/svg+xml">
  <link rel="stylesheet" href="/docs/assets/swagger-ui.css">
  <link rel="stylesheet" href="/docs/assets/reference.css">
</head>
<body>
  <header class="fw-band">
    <a class="fw-mark" href="/"><img src="/inspect/assets/icon.svg" alt="" width="22" height="22"> foldwise ${esc(version)}</a>
    <nav aria-label="Site"><a href="/">Start</a> <a href="/inspect">Inspector</a> <a href="/docs" aria-current="page">API reference</a> <a href="/docs/errors">Error codes</a> <a href="/docs/openapi.json">OpenAPI JSON</a></nav>
  </header>
  <main id="reference"><noscript>This reference is drawn by a script; the document itself is <a href="/docs/openapi.json">/docs/openapi.json</a>.</noscript></main>
  <script src="/docs/assets/swagger-ui-bundle.js"></script>
  <script src="/docs/assets/reference.js"></script>
</body>
</html>
`;

/**
 * The start script. `validatorUrl: null` keeps the page from asking a public validator
 * about our document (the package's default); the rest are display choices.
 */
export const referenceScript = `'use strict';
// Draws the API reference from this service's OpenAPI document (src/http/pages/reference.ts).
globalThis.SwaggerUIBundle({
  url: '/docs/openapi.json',
  dom_id: '#reference',
  deepLinking: true,
  docExpansion: 'list',
  defaultModelsExpandDepth: 0,
  displayRequestDuration: true,
  validatorUrl: null,
  presets: [globalThis.SwaggerUIBundle.presets.apis],
  layout: 'BaseLayout',
});
`;

/** The site's palette (src/http/pages/site-css.ts) over the package's stylesheet, lightly. */
export const referenceCss = `
:root { --ink: #1d2326; --paper: #f6f5f2; --card: #ffffff; --accent: #2c5d73; --focus: #b3541e; --warp: #e4e1d8; --get: #2f6b3a; --post: #8a5a00; --del: #a3261c; }
body { margin: 0; background: var(--paper); color: var(--ink); }
.fw-band { display: flex; flex-wrap: wrap; align-items: center; gap: .5rem 2rem; padding: .8rem 1.5rem; background: var(--card);
  font: 16px/1.55 system-ui, sans-serif; border-bottom: 3px solid transparent;
  border-image: repeating-linear-gradient(90deg, var(--accent) 0 6px, var(--warp) 6px 9px) 3; }
.fw-mark { display: inline-flex; align-items: center; gap: .5rem; font-weight: 700; color: var(--ink); text-decoration: none; }
.fw-band nav { display: flex; flex-wrap: wrap; gap: .25rem 1.25rem; }
.fw-band nav a { color: var(--accent); text-decoration: none; border-bottom: 2px solid transparent; }
.fw-band nav a:hover, .fw-band nav a[aria-current="page"] { border-bottom-color: var(--focus); }
.swagger-ui a, .swagger-ui .info a { color: var(--accent); }
.swagger-ui .opblock.opblock-get { border-color: var(--get); background: rgba(47, 107, 58, .06); }
.swagger-ui .opblock.opblock-get .opblock-summary-method { background: var(--get); }
.swagger-ui .opblock.opblock-post { border-color: var(--post); background: rgba(138, 90, 0, .06); }
.swagger-ui .opblock.opblock-post .opblock-summary-method { background: var(--post); }
.swagger-ui .opblock.opblock-delete { border-color: var(--del); background: rgba(163, 38, 28, .06); }
.swagger-ui .opblock.opblock-delete .opblock-summary-method { background: var(--del); }
.swagger-ui .btn.execute { background: var(--accent); border-color: var(--accent); }
`;

/**
 * The reference page's policy: the page policy (src/http/pages/html.ts) plus what Swagger UI
 * needs, all from this origin: its bundle and our start script (script-src 'self'), fetching
 * the document and "try it out" requests (connect-src 'self'), and the data: URIs its stylesheet
 * draws icons with (img-src data:). No inline script, no eval, no other host.
 */
export const referencePolicy = [
  "default-src 'none'",
  "script-src 'self'",
  "style-src 'self'",
  "img-src 'self' data:",
  "connect-src 'self'",
  "form-action 'self'",
  "base-uri 'none'",
  "frame-ancestors 'none'",
].join('; ');

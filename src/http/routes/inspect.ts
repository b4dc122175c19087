import { createHash } from 'node:crypto';
import { existsSync } from 'node:fs';
import { readdir, readFile, stat } from 'node:fs/promises';
import { join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import type { FastifyInstance, FastifyReply, FastifyRequest } from 'fastify';
import { findKernel, kernelNames } from '../../core/kernels/index.js';
import { FoldwiseError } from '../../errors.js';
import { SingleFlight } from '../../lib/single-flight.js';
import { matchesIfNoneMatch } from './conditional.js';

/** One served file of the inspector page: its bytes, type and a strong validator. */
interface Asset {
  body: Buffer;
  type: string;
  etag: string;
}

/**
 * The page may reach this service only: scripts, styles and images come from here (images
 * also as blob: URLs the client makes from fetched renditions), nothing from elsewhere.
 */
const contentSecurityPolicy = [
  "default-src 'none'",
  "script-src 'self'",
  "style-src 'self'",
  "img-src 'self' blob:",
  "connect-src 'self'",
  "base-uri 'none'",
  "form-action 'self'",
  "frame-ancestors 'none'",
].join('; ');

/**
 * The folder with page.html, style.css and client.ts. Running from src (tsx) it sits beside
 * this file's folder; running from a tsc build (dist/) the sources stay in the package's src/.
 */
function inspectorDir(): string {
  const beside = fileURLToPath(new URL('../../inspector/', import.meta.url));
  const candidates = [beside, join(beside, '..', '..', 'src', 'inspector')];
  const found = candidates.find((dir) => existsSync(join(dir, 'page.html')));
  if (!found) throw new Error(`inspector page not found in ${candidates.join(' or ')}`);
  return found;
}

function asset(body: Buffer, type: string): Asset {
  const digest = createHash('sha256').update(body).digest('base64url').slice(0, 27);
  return { body, type, etag: `"${digest}"` };
}

/** Running from TypeScript sources (tsx, vitest), where the bundle may be missing or stale. */
const fromSource = import.meta.url.endsWith('.ts');
/** dist/inspector/client.js, from this file in src/http/routes/ or in dist/http/routes/. */
const bundleFile = fileURLToPath(new URL(fromSource ? '../../../dist/inspector/client.js' : '../../inspector/client.js', import.meta.url));

/** Whether the bundle is older than a file of src/inspector/ (or missing). */
async function stale(dir: string): Promise<boolean> {
  const built = await stat(bundleFile).catch(() => undefined);
  if (!built) return true;
  const names = await readdir(dir);
  const times = await Promise.all(names.filter((n) => n.endsWith('.ts')).map((n) => stat(join(dir, n)).then((s) => s.mtimeMs)));
  return times.some((t) => t > built.mtimeMs);
}

/**
 * The client script, bundled at build time (scripts/bundle-inspector.mjs; `npm run build` and
 * `npm install` make it), read at registration. From the sources a missing or stale bundle is
 * made once, here, at start; a build without one is a packaging error, said at start.
 */
async function clientScript(dir: string): Promise<Asset> {
  if (fromSource && (await stale(dir))) {
    const script = pathToFileURL(join(dir, '..', '..', 'scripts', 'bundle-inspector.mjs')).href;
    const { bundleInspector } = (await import(script)) as { bundleInspector: (root: string) => Promise<void> };
    await bundleInspector(join(dir, '..', '..'));
  }
  const body = await readFile(bundleFile).catch(() => {
    throw new Error(`the inspector's script ${bundleFile} is missing: run \`npm run build\` (or \`npm run build:cli\`)`);
  });
  return asset(body, 'text/javascript; charset=utf-8');
}

async function readAsset(dir: string, name: string, type: string): Promise<Asset> {
  return asset(await readFile(join(dir, name)), type);
}

const escapeHtml = (text: string) =>
  text.replace(/[&<>"]/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;' })[c] ?? c);

/**
 * The Kernel menu, from the core's kernel table (the one registry the `kernel` parameter
 * accepts), so a kernel added there appears here without a second list to keep.
 */
export function kernelOptions(): string {
  const options = kernelNames.map((name) => {
    const about = findKernel(name)?.source;
    return `<option value="${escapeHtml(name)}">${escapeHtml(about ? `${name}: ${about}` : name)}</option>`;
  });
  return ['<option value="auto">auto: bandlimit when shrinking, an interpolator when enlarging</option>', ...options].join('\n          ');
}

async function readPage(dir: string): Promise<Asset> {
  const html = (await readFile(join(dir, 'page.html'), 'utf8')).replace('<!-- kernel options -->', kernelOptions());
  return asset(Buffer.from(html), 'text/html; charset=utf-8');
}

/** Runs `load` once and keeps its result; a failure is forgotten so the next call retries. */
function memo(load: () => Promise<Asset>): () => Promise<Asset> {
  const flight = new SingleFlight<Asset>();
  let loaded: Asset | undefined;
  return async () => {
    if (loaded) return loaded;
    const { value } = await flight.run('asset', load);
    loaded = value;
    return value;
  };
}

function send(request: FastifyRequest, reply: FastifyReply, file: Asset) {
  reply
    .header('Content-Type', file.type)
    .header('ETag', file.etag)
    .header('Cache-Control', 'no-cache')
    .header('X-Content-Type-Options', 'nosniff');
  if (matchesIfNoneMatch(request.headers['if-none-match'], file.etag)) return reply.code(304).send();
  return reply.send(file.body);
}

/**
 * GET /inspect: the page that shows the legacy look, the planned rendition and optionally point
 * sampling side by side with the alias-risk report; GET /inspect/assets/{style.css,client.js,icon.svg}: its stylesheet, script and icon.
 * Files are read on first request (the script at registration: it is bundled at build time) and
 * kept in memory for the process lifetime.
 */
export default async function inspectRoutes(app: FastifyInstance): Promise<void> {
  const dir = inspectorDir();
  const script = await clientScript(dir);
  const page = memo(() => readPage(dir));
  const assets: Record<string, () => Promise<Asset>> = {
    'style.css': memo(() => readAsset(dir, 'style.css', 'text/css; charset=utf-8')),
    'client.js': async () => script,
    'icon.svg': memo(() => readAsset(dir, 'icon.svg', 'image/svg+xml')),
  };

  const openapi = {
    summary: 'The inspector page: the legacy look and the foldwise rendition side by side, with the alias-risk report',
    tags: ['inspector'],
    responses: { '200': { description: 'An HTML page', content: { 'text/html': {} } } },
  };
  app.get('/inspect', { config: { openapi } }, async (request, reply) => {
    reply.header('Content-Security-Policy', contentSecurityPolicy);
    reply.header('Referrer-Policy', 'no-referrer');
    return send(request, reply, await page());
  });

  app.get<{ Params: { name: string } }>('/inspect/assets/:name', async (request, reply) => {
    const { name } = request.params;
    if (!Object.hasOwn(assets, name)) {
      throw new FoldwiseError('ERR_NOT_FOUND', `no inspector asset named ${name}`);
    }
    return send(request, reply, await assets[name]());
  });
}

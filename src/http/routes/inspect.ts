import { createHash } from 'node:crypto';
import { existsSync } from 'node:fs';
import { readFile } from 'node:fs/promises';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
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

/** Compiles the client TypeScript for the browser, once; esbuild loads only when first asked. */
async function compileClient(dir: string): Promise<Asset> {
  const { build } = await import('esbuild');
  const result = await build({
    entryPoints: [join(dir, 'client.ts')],
    bundle: true,
    format: 'esm',
    platform: 'browser',
    target: ['es2022'],
    write: false,
    logLevel: 'silent',
    legalComments: 'none',
  });
  return asset(Buffer.from(result.outputFiles[0].contents), 'text/javascript; charset=utf-8');
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
 * Files are read and compiled on first request and kept in memory for the process lifetime.
 */
export default async function inspectRoutes(app: FastifyInstance): Promise<void> {
  const dir = inspectorDir();
  const page = memo(() => readPage(dir));
  const assets: Record<string, () => Promise<Asset>> = {
    'style.css': memo(() => readAsset(dir, 'style.css', 'text/css; charset=utf-8')),
    'client.js': memo(() => compileClient(dir)),
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

import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';
import type { FastifyInstance } from 'fastify';
import { FoldwiseError } from '../../errors.js';
import { referenceCss, referenceScript } from '../pages/reference.js';
import { matchesIfNoneMatch } from './conditional.js';

interface Asset {
  type: string;
  /** Read on first request (the bundle is about 1.5 MB), then kept. */
  body: () => Buffer;
  cache: string;
}

const packageDir = dirname(createRequire(import.meta.url).resolve('swagger-ui-dist/package.json'));
const fromPackage = (file: string): (() => Buffer) => {
  let bytes: Buffer | undefined;
  return () => (bytes ??= readFileSync(join(packageDir, file)));
};

/**
 * The files the API reference loads. The package's files change only when the package does:
 * a day's caching, revalidated by ETag after; our own two are revalidated on every load.
 */
const assets: Record<string, Asset> = {
  'swagger-ui-bundle.js': { type: 'text/javascript; charset=utf-8', body: fromPackage('swagger-ui-bundle.js'), cache: 'public, max-age=86400' },
  'swagger-ui.css': { type: 'text/css; charset=utf-8', body: fromPackage('swagger-ui.css'), cache: 'public, max-age=86400' },
  'reference.js': { type: 'text/javascript; charset=utf-8', body: () => Buffer.from(referenceScript), cache: 'no-cache' },
  'reference.css': { type: 'text/css; charset=utf-8', body: () => Buffer.from(referenceCss), cache: 'no-cache' },
};

const etags = new Map<string, string>();
const etagOf = (name: string, body: Buffer): string => {
  let tag = etags.get(name);
  if (!tag) etags.set(name, (tag = `"${createHash('sha256').update(body).digest('base64url').slice(0, 27)}"`));
  return tag;
};

/** GET /docs/assets/{name}: Swagger UI's bundle and stylesheet, and our start script and CSS. */
export default async function docsAssetRoutes(app: FastifyInstance): Promise<void> {
  app.get<{ Params: { name: string } }>('/docs/assets/:name', async (request, reply) => {
    const asset = Object.hasOwn(assets, request.params.name) ? assets[request.params.name] : undefined;
    if (!asset) throw new FoldwiseError('ERR_NOT_FOUND', `no reference asset named ${request.params.name}`);
    const body = asset.body();
    const etag = etagOf(request.params.name, body);
    reply.type(asset.type).header('etag', etag).header('cache-control', asset.cache).header('x-content-type-options', 'nosniff');
    if (matchesIfNoneMatch(request.headers['if-none-match'], etag)) return reply.code(304).send();
    return reply.send(body);
  });
}

/**
 * Prints the manifest placeholder of every demo picture as the upload hook makes it: bytes of
 * the WebP, of its data URI, its size and mean colour. Through HTTP (app.inject) on a fresh
 * cache, so the figures are what a user meets. Usage: npx tsx scripts/placeholder-sizes.ts
 */
import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { build } from '../src/app.js';
import { deepMerge, resolveConfig } from '../src/config.js';
import { ensureDemoImages } from '../tools/demo/index.js';

const dir = await mkdtemp(join(tmpdir(), 'fw-placeholder-'));
try {
  const sources = join(dir, 'images');
  const names = await ensureDemoImages(sources);
  const config = resolveConfig(
    deepMerge({}, { server: { logLevel: 'silent' }, origin: { sourceDir: sources, generateDemo: false }, cache: { dir: join(dir, 'cache') }, pool: { threads: 1 } }),
  );
  const app = await build({ config });
  try {
    console.log('| picture | source | placeholder | WebP bytes | data URI bytes | mean |');
    console.log('|---|---|---|---|---|---|');
    for (const name of names) {
      const res = await app.inject({ method: 'POST', url: '/v1/ingest?widths=160&formats=webp', payload: { source: name } });
      const m = res.json();
      const p = m.placeholder;
      console.log(`| ${name} | ${m.source.width}x${m.source.height} | ${p.width}x${p.height} | ${p.bytes} | ${p.dataUri.length} | ${p.mean} |`);
    }
  } finally {
    await app.close();
  }
} finally {
  await rm(dir, { recursive: true, force: true });
}

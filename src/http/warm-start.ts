/**
 * Renders the start page's tiles once, one after another, right after the demo server starts,
 * so a developer's first look at `/` is answered from the cache. Seven tiles asked at once
 * from a cold cache is seven full decodes of 2000 px class pictures, more than the render
 * memory budget holds on a small machine: some tiles answered 503 (measured: 2 of 7 on a
 * loaded two-core machine). Through app.inject, so each tile takes the path a browser's
 * request takes and lands under the same cache key (the same Accept as a browser's <img>).
 */
import type { FastifyInstance } from 'fastify';
import { shelfSources, tileUrls } from './pages/home.js';

/** What Chromium sends for an <img> (Firefox and Safari also rank AVIF and WebP first). */
export const imgAccept = 'image/avif,image/webp,image/apng,image/svg+xml,image/*,*/*;q=0.8';

/**
 * Resolves when every tile has been asked for once, or the server stops listening (shutdown);
 * never rejects. Call after listen.
 */
export async function warmStartPage(app: FastifyInstance): Promise<{ warmed: number; failed: number }> {
  const tally = { warmed: 0, failed: 0 };
  const sources = (await app.origin.list?.().catch(() => [])) ?? [];
  for (const url of shelfSources(sources.map((s) => s.path)).flatMap(tileUrls)) {
    if (!app.server.listening) break;
    const res = await app.inject({ url, headers: { accept: imgAccept } }).catch(() => undefined);
    if (res?.statusCode === 200) tally.warmed++;
    else tally.failed++;
  }
  app.log.info(tally, 'start page tiles rendered');
  return tally;
}

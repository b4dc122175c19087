import type { FastifyInstance } from 'fastify';
import fp from 'fastify-plugin';
import { PurgeBus } from '../../cache/purge-bus.js';
import { FoldwiseError } from '../../errors.js';

/** What a deletion did. */
export interface Deletion {
  source: string;
  /** Whether the source itself was in the origin (false: only cached copies were left). */
  removed: boolean;
  /** Cache entries (renditions, analyses) deleted from every tier. */
  entries: number;
  /** Other replicas told, and how many confirmed before the answer. */
  replicas: number;
  confirmed: number;
}

declare module 'fastify' {
  interface FastifyInstance {
    /** Deletes a source and everything made from it, on every tier and every replica. */
    deleteSource(path: string): Promise<Deletion>;
    /** The purge channel with Redis (readiness waits for its subscription); null without. */
    purgeBus: PurgeBus | null;
  }
}

const CONFIRM_MS = 2000;

/**
 * Deletion of a source: the source from the origin first (no new render can start from it),
 * then every key the source index holds for it from every tier of this replica (memory, then
 * disk or Redis), its identity memo, kept bytes, spectrum and manifests; with Redis, the other replicas do
 * the same for their memory on the purge message before this answers (or CONFIRM_MS passes).
 * With Redis configured but away it refuses (503 ERR_PURGE_DOWN) before deleting anything.
 */
async function deletionPlugin(app: FastifyInstance): Promise<void> {
  const { renderContext: ctx, renditionCache, spectra, ingest, sourceIndex } = app;
  const forgetLocally = async (source: string, keys: string[]): Promise<void> => {
    ctx.identities?.forget(source);
    ctx.sources?.forget(source);
    ctx.keptDecodes?.forget(source);
    spectra.forget(source);
    ingest.forgetSource(source);
    const tiers = renditionCache.cache.tiers;
    // A rendition answered before its store ended (renderRendition's answerFirst) is written first.
    await renditionCache.cache.settled();
    await Promise.all(tiers.flatMap((t) => keys.map((k) => t.delete?.(k))));
  };
  const shared = app.sharedRedis;
  const bus = shared ? new PurgeBus(shared.tier.link, forgetLocally, (err) => app.log.warn({ err }, 'purge message failed')) : undefined;
  if (bus) void bus.start();
  app.decorate('purgeBus', bus ?? null);

  const retryAfter = { 'retry-after': String(app.config.pool.retryAfterSeconds) };
  const purgeDown = (detail: string, cause?: unknown) => new FoldwiseError('ERR_PURGE_DOWN', detail, { cause, headers: retryAfter });

  app.decorate('deleteSource', async (path: string): Promise<Deletion> => {
    const remove = app.origin.remove?.bind(app.origin);
    if (!remove) throw new FoldwiseError('ERR_ORIGIN_DISABLED', 'this origin cannot delete sources');
    // Without Redis the other replicas would keep serving what this one deletes: refuse first.
    const link = shared?.health();
    if (bus && (link?.status !== 'up' || link.breaker === 'open')) {
      throw purgeDown('deleting needs Redis to reach every replica, and Redis cannot be reached; nothing was deleted');
    }
    const identity = await app.origin.identify(path).catch((e: unknown) => {
      if (e instanceof FoldwiseError && e.code === 'ERR_SOURCE_NOT_FOUND') return undefined;
      throw e;
    });
    const source = identity?.key ?? path;
    const removed = await remove(path);
    const purge = async () => {
      const keys = await sourceIndex.take(source);
      await forgetLocally(source, keys);
      ctx.identities?.forget(path);
      const told = bus ? await bus.broadcast(source, keys, CONFIRM_MS) : { replicas: 0, confirmed: 0 };
      return { keys, told };
    };
    const { keys, told } = await purge().catch((e: unknown) => {
      // Redis went away midway: the source may be gone already; sending the DELETE again purges the rest.
      throw bus ? purgeDown('Redis failed while the deletion was told to the other replicas; send it again', e) : e;
    });
    if (!removed && keys.length === 0) throw new FoldwiseError('ERR_SOURCE_NOT_FOUND', `No source "${source}".`);
    return { source, removed, entries: keys.length, ...told };
  });
}

export default fp(deletionPlugin, {
  name: 'foldwise-deletion',
  fastify: '5.x',
  dependencies: ['foldwise-render', 'foldwise-cache', 'foldwise-spectra', 'foldwise-ingest', 'foldwise-source-index'],
});

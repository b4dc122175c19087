import type { FastifyInstance } from 'fastify';
import fp from 'fastify-plugin';
import { FileSourceIndex, RedisSourceIndex, type SourceIndex } from '../../cache/source-index.js';

declare module 'fastify' {
  interface FastifyInstance {
    /** Cache keys by source, for deleting a source's renditions and analyses. */
    sourceIndex: SourceIndex;
    /** Notes a key for a source in the background; a failure is logged, never thrown. */
    noteCached(source: string, key: string): void;
  }
}

/** On Redis when the app shares it (every replica's renders in one place), else beside the disk cache. */
async function sourceIndexPlugin(app: FastifyInstance): Promise<void> {
  const shared = app.sharedRedis;
  const index: SourceIndex = shared ? new RedisSourceIndex(shared.tier.link, app.config.redis.ttlSeconds) : new FileSourceIndex(app.config.cache.dir);
  app.decorate('sourceIndex', index);
  app.decorate('noteCached', (source: string, key: string) => {
    index.record(source, key).catch((err: unknown) => app.log.warn({ err, source }, 'noting a cache key for its source failed'));
  });
}

export default fp(sourceIndexPlugin, { name: 'foldwise-source-index', fastify: '5.x', dependencies: ['foldwise-redis'] });

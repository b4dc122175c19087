import type { FastifyInstance } from 'fastify';
import { MemoryTier } from '../../src/cache/memory.js';

/** Entries in the app's memory tier: a refusal that left one behind was cached wrongly. */
export function memoryEntries(app: FastifyInstance): number {
  const tier = app.renditionCache.cache.tiers.find((x) => x instanceof MemoryTier) as MemoryTier | undefined;
  return tier?.entries ?? 0;
}

import underPressure from '@fastify/under-pressure';
import type { FastifyInstance, FastifyRequest } from 'fastify';
import fp from 'fastify-plugin';
import { FoldwiseError } from '../../errors.js';

/** Load-shedding limits; 0 switches a check off. */
export interface PressureOptions {
  /** Mean event-loop delay over a sample, in ms. */
  maxEventLoopDelayMs: number;
  maxHeapUsedBytes: number;
  maxRssBytes: number;
  /** How often the process is sampled, in ms. */
  sampleIntervalMs: number;
  retryAfterSeconds: number;
}

declare module 'fastify' {
  interface FastifyInstance {
    /** The load-shedding limits in force (for /readyz and the docs). */
    pressureLimits: PressureOptions;
  }
  interface FastifyRequest {
    /** The 503 a rendition request gets if it turns out to be a miss while shedding (hits are served). */
    shedding: FoldwiseError | null;
  }
}

// Liveness and scraping must keep answering under load, or an orchestrator would restart a
// replica for being busy and the metrics would go dark exactly when they matter.
const exempt = new Set(['/healthz', '/metrics', '/readyz']); // /readyz: a busy replica still serves hits
// A cache hit costs a lookup: shedding it would drop the answers a busy replica can still give
// (seen: 10 % of hits refused during a miss flood). Renditions are shed at their miss instead.
const hitsFirst = '/v1/renditions/';

const units: Record<string, (v: number) => string> = {
  // Infinity: the loop was blocked for a whole sample, so no delay could be measured in it.
  eventLoopDelay: (v) => (Number.isFinite(v) ? `event-loop delay ${v.toFixed(0)} ms` : 'event loop blocked through a whole sample'),
  heapUsedBytes: (v) => `heap ${(v / 2 ** 20).toFixed(0)} MiB`,
  rssBytes: (v) => `resident memory ${(v / 2 ** 20).toFixed(0)} MiB`,
  eventLoopUtilization: (v) => `event-loop utilisation ${(v * 100).toFixed(0)} %`,
};

/**
 * Sheds load when the process is saturated: past any limit, every request except liveness and
 * metrics gets 503 with Retry-After as problem+json (ERR_OVERLOADED), before any work starts;
 * a rendition gets it only once the cache has missed (request.shedding, src/rendition/service.ts).
 */
async function pressurePlugin(app: FastifyInstance, options: PressureOptions): Promise<void> {
  app.decorate('pressureLimits', options);
  app.decorateRequest('shedding', null);
  const retryAfter = String(options.retryAfterSeconds);
  await app.register(underPressure, {
    maxEventLoopDelay: options.maxEventLoopDelayMs,
    maxHeapUsedBytes: options.maxHeapUsedBytes,
    // Not RSS: a process whose memory does not come back (allocator, a thread's garbage) would
    // refuse everything for good. Memory is bounded by admission (src/pool/budget.ts), RSS
    // stays a last-resort guard there, and /healthz fails when it cannot recover (memory-watch.ts).
    maxRssBytes: 0,
    sampleInterval: options.sampleIntervalMs,
    retryAfter: options.retryAfterSeconds,
    // A rejected promise reaches the app's error handler, which writes the problem details.
    pressureHandler: async (request: FastifyRequest, _reply, type: string, value: number | undefined) => {
      if (exempt.has(request.url.split('?', 1)[0])) return;
      // No tick in a whole sample proves a block as long as the sample, not one over a longer
      // limit (500 ms samples, 1000 ms limit): a collection and a busy machine made such
      // samples and refused misses on a replica that was not overloaded (load:hostile b, e, f).
      const blockedSample = type === 'eventLoopDelay' && !Number.isFinite(value ?? Infinity);
      if (blockedSample && options.sampleIntervalMs < options.maxEventLoopDelayMs) return;
      request.log.warn({ pressure: type, value }, 'shedding load');
      const what = value === undefined ? type : (units[type]?.(value) ?? `${type} ${value}`);
      const refusal = new FoldwiseError('ERR_OVERLOADED', `Shedding load: ${what} is over its limit; retry in ${retryAfter} s.`, {
        headers: { 'Retry-After': retryAfter },
      });
      if (!request.url.startsWith(hitsFirst)) throw refusal;
      request.shedding = refusal;
    },
  });
}

export default fp(pressurePlugin, { name: 'foldwise-pressure', fastify: '5.x' });

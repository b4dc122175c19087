import { z } from 'zod';
import { originSchema, serverSchema } from './network.js';
import { cacheSchema, limitsSchema, poolSchema, redisSchema } from './work.js';
import { httpSchema, ingestSchema, pressureSchema, shutdownSchema, signingSchema } from './service.js';

/** The whole configuration, validated at start; unknown keys are refused so typos surface. */
export const configSchema = z.strictObject({
  server: serverSchema,
  origin: originSchema,
  limits: limitsSchema,
  pool: poolSchema,
  cache: cacheSchema,
  redis: redisSchema,
  pressure: pressureSchema,
  shutdown: shutdownSchema,
  http: httpSchema,
  signing: signingSchema,
  ingest: ingestSchema,
});

export type Config = z.infer<typeof configSchema>;
export type Limits = Config['limits'];

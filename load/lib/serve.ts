/**
 * A server for the load scripts, run in its own process by load/lib/child.ts:
 *   serve.ts app   - the service, from config (FOLDWISE_CONFIG, FOLDWISE_* env)
 *   serve.ts bare  - a bare Fastify route GET /bare returning LOAD_BODY_FILE's bytes
 * Both listen on 127.0.0.1 on a free port, print `listening <port>`, and stop on SIGTERM.
 */
import { readFileSync } from 'node:fs';
import Fastify, { type FastifyInstance } from 'fastify';
import { build } from '../../src/app.js';
import { loadConfig } from '../../src/config.js';
import { installShutdown } from '../../src/shutdown.js';

async function bare(): Promise<FastifyInstance> {
  const body = readFileSync(process.env.LOAD_BODY_FILE ?? '');
  const type = process.env.LOAD_BODY_TYPE ?? 'application/octet-stream';
  const app = Fastify({ logger: false });
  app.get('/bare', async (_req, reply) => reply.type(type).send(body));
  return app;
}

const mode = process.argv[2];
const app = mode === 'bare' ? await bare() : await build({ config: loadConfig() });
installShutdown(app, { deadlineMs: 10_000 });
await app.listen({ host: '127.0.0.1', port: 0 });
const address = app.server.address();
console.log(`listening ${typeof address === 'object' && address ? address.port : 0}`);

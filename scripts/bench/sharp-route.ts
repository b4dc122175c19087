/**
 * The reference server of the through-HTTP benchmark (scripts/bench/service.ts): a bare
 * Fastify route doing sharp's linear-light resize and a q82 JPEG encode of a source file,
 * `GET /sharp/<name>?width=<px>`. Listens on 127.0.0.1 on a free port, prints
 * `listening <port>`, and stops on SIGTERM.
 *   node --import tsx scripts/bench/sharp-route.ts <source folder>
 */
import { readFile } from 'node:fs/promises';
import { basename, join } from 'node:path';
import Fastify from 'fastify';
import sharp from 'sharp';

const dir = process.argv[2] ?? '.';
const app = Fastify({ logger: false });
app.get<{ Params: { name: string }; Querystring: { width?: string } }>('/sharp/:name', async (req, reply) => {
  const source = await readFile(join(dir, basename(req.params.name)));
  const body = await sharp(source)
    .pipelineColourspace('scrgb')
    .resize({ width: Number(req.query.width ?? 800) })
    .toColourspace('srgb')
    .jpeg({ quality: 82 })
    .toBuffer();
  return reply.type('image/jpeg').send(body);
});
process.once('SIGTERM', () => void app.close().then(() => process.exit(0)));
await app.listen({ host: '127.0.0.1', port: 0 });
const address = app.server.address();
console.log(`listening ${typeof address === 'object' && address ? address.port : 0}`);

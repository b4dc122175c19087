import type { IncomingMessage } from 'node:http';
import type { FastifyInstance, FastifyReply, FastifyRequest } from 'fastify';
import { errorCodes, FoldwiseError } from '../../errors.js';
import type { IngestWork } from '../../ingest/service.js';
import { prefersAsync, readUpload } from '../../ingest/upload.js';
import { toFoldwiseError } from '../plugins/errors.js';
import { ingestQuerySchema, ingestSourceBody, jobSchema, manifestSchema } from '../../schemas/ingest.js';
import { jsonBody, problemResponses, queryParameters } from '../../schemas/openapi.js';
import { parseQuery } from '../../schemas/query.js';
import { checkSignedUrl, signingRequired } from '../../security/signing.js';
import { checkSource, checkUpload, requireBinding } from '../../security/ingest-binding.js';

export const ingestPath = '/v1/ingest';
export const jobsPrefix = '/v1/ingest/jobs/';

/** A failure as a job shows it: code and a sentence; a 5xx shows only its title. */
function jobError(e: unknown): { code: string; detail: string } {
  const fw = toFoldwiseError(e);
  return { code: fw.code, detail: fw.status >= 500 ? errorCodes[fw.code].title : fw.message };
}

function mediaTypeError(request: FastifyRequest): FoldwiseError {
  const type = request.headers['content-type'] ?? 'a body without Content-Type';
  return new FoldwiseError('ERR_INGEST_MEDIA_TYPE', `cannot ingest ${type}: send image/* bytes or application/json {"source": "..."}`);
}

/**
 * POST /v1/ingest (the upload hook) and GET /v1/ingest/jobs/{id}. Image bytes (image/*) are
 * read by this plugin's own content-type parser within limits.maxUploadBytes; JSON names a
 * source already in the origin. `Prefer: respond-async` (RFC 7240) answers 202 with the job
 * URL in Location (RFC 9110 section 15.3.3); everything else answers the manifest.
 */
export default async function ingestRoutes(app: FastifyInstance): Promise<void> {
  const { config, ingest } = app;
  const query = ingestQuerySchema(config.limits.maxDimension);
  const limit = config.limits.maxUploadBytes;

  app.addContentTypeParser(/^image\/[a-z0-9.+-]+$/i, (request: FastifyRequest, payload: IncomingMessage) =>
    readUpload(payload, request.headers['content-length'], limit),
  );
  // Fastify's built-in text/plain parser would read up to its body limit and answer 413; a text
  // upload is refused as the wrong type (415) before any of its body is read.
  app.removeContentTypeParser('text/plain');
  app.addContentTypeParser('*', async (request: FastifyRequest) => {
    throw mediaTypeError(request);
  });

  // Signing, when on, covers the upload hook too: the path and every query parameter. The body
  // is not signed, so a signed URL must name it (digest or source, see ingest/binding.ts); both
  // are checked before the body is read, so an unsigned or unbound upload costs one HMAC.
  const keys = config.signing.keys;
  const required = signingRequired(config.signing);
  const signedRequests = new WeakSet<FastifyRequest>();
  app.addHook('onRequest', async (request) => {
    if (keys.length === 0 || request.method !== 'POST') return;
    if (!checkSignedUrl(request.url, keys, required, 'Uploads need a signed URL (parameter "signature"); see foldwise sign.')) return;
    signedRequests.add(request);
    const raw = request.query as Record<string, unknown>;
    requireBinding({ digest: raw.digest as string | undefined, source: raw.source as string | undefined });
  });

  async function workOf(request: FastifyRequest): Promise<IngestWork> {
    const q = parseQuery(query, request.query as Record<string, unknown>);
    const rendition: Record<string, string> = {};
    for (const name of ['prefilter', 'kernel', 'light'] as const) if (q[name] !== undefined) rendition[name] = q[name];
    const options = { widths: q.widths, formats: q.formats, rendition, sizes: q.sizes };
    const binding = { digest: q.digest, source: q.source };
    if (signedRequests.has(request)) requireBinding(binding);
    const body: unknown = request.body;
    if (Buffer.isBuffer(body)) return ingest.fromUpload(body, options, checkUpload(body, binding), prefersAsync(request.headers.prefer));
    if (body === undefined || body === null) throw new FoldwiseError('ERR_INGEST_EMPTY', 'the request has no body: send image bytes or JSON naming a source');
    if (!/^application\/json\b/i.test(request.headers['content-type'] ?? '')) throw mediaTypeError(request);
    const parsed = ingestSourceBody.safeParse(body);
    if (!parsed.success) throw new FoldwiseError('ERR_REQUEST_INVALID', `JSON body: ${parsed.error.issues[0].message}`);
    checkSource(parsed.data.source, binding);
    return ingest.fromSource(parsed.data.source, options);
  }

  async function post(request: FastifyRequest, reply: FastifyReply) {
    const work = await workOf(request);
    reply.header('cache-control', 'no-store');
    if (!prefersAsync(request.headers.prefer) || ingest.isDone(work.key)) {
      return reply.send(await ingest.run(work).value);
    }
    if (!ingest.jobs.accepting) throw new FoldwiseError('ERR_SERVICE_STOPPING', 'the service is stopping and takes no new ingest jobs');
    const job = ingest.jobs.start((started) => ingest.run(work, started).value, jobError);
    if (!job) {
      throw new FoldwiseError('ERR_INGEST_JOBS_FULL', `${config.ingest.maxJobs} ingest jobs are unfinished`, {
        headers: { 'retry-after': String(config.pool.retryAfterSeconds) },
      });
    }
    return reply
      .code(202)
      .header('location', `${jobsPrefix}${job.id}`)
      .header('preference-applied', 'respond-async')
      .send({ id: job.id, state: job.state, createdAt: job.createdAt });
  }

  app.post(
    ingestPath,
    {
      config: {
        openapi: {
          summary: 'Ingest a picture: rendition ladder, srcset, alias-risk warnings, pre-rendered cache',
          description:
            'Body: image bytes (image/*, at most limits.maxUploadBytes) stored under a content-addressed key, or JSON {"source": "path/in/origin"}. With "Prefer: respond-async" the answer is 202 and Location names the job. With signing on, the signed query must name the body: digest (SHA-256 hex of the upload) or source (equal to the JSON body\'s source).',
          tags: ['ingest'],
          parameters: [
            // Comma lists: OpenAPI style form with explode false.
            ...queryParameters(query).map((p) => ({ ...(p as object), explode: false })),
            { name: 'Prefer', in: 'header', required: false, description: 'respond-async (RFC 7240)', schema: { type: 'string' } },
          ],
          requestBody: {
            content: { 'image/*': {}, 'application/json': { schema: { type: 'object', properties: { source: { type: 'string' } }, required: ['source'] } } },
          },
          responses: {
            '200': jsonBody('The manifest', manifestSchema),
            '202': jsonBody('Accepted; poll the Location URL', jobSchema),
            ...problemResponses(400, 403, 404, 413, 415, 422, 503),
          },
        },
      },
    },
    post,
  );

  app.get(
    `${jobsPrefix}:id`,
    {
      config: {
        openapi: {
          summary: 'State of an asynchronous ingest job, with its manifest once done',
          tags: ['ingest'],
          parameters: [{ name: 'id', in: 'path', required: true, schema: { type: 'string' } }],
          responses: { '200': jsonBody('The job', jobSchema), ...problemResponses(404) },
        },
      },
    },
    async (request: FastifyRequest<{ Params: { id: string } }>, reply) => {
      const job = ingest.jobs.get(request.params.id);
      if (!job) throw new FoldwiseError('ERR_INGEST_JOB_NOT_FOUND', 'no ingest job with this id (finished jobs are forgotten after a while)');
      const { result, ...rest } = job;
      return reply.header('cache-control', 'no-store').send({ ...rest, manifest: result });
    },
  );
}

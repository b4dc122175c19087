import type { IncomingMessage } from 'node:http';
import multipart from '@fastify/multipart';
import type { FastifyInstance, FastifyReply, FastifyRequest } from 'fastify';
import { FoldwiseError } from '../../errors.js';
import type { IngestWork } from '../../ingest/service.js';
import { prefersAsync, readUpload } from '../../ingest/upload.js';
import { queueDown } from '../../ingest/queue-terms.js';
import { checkCallbackUrl } from '../../ingest/callback.js';
import { parseAllowHosts } from '../../origins/http-allowlist.js';
import { jobStarter } from './ingest-jobs.js';
import { multipartLimits, readMultipart } from './ingest-multipart.js';
import { ingestQuerySchema, ingestSourceBody, jobSchema, manifestSchema } from '../../schemas/ingest.js';
import { jsonBody, problemResponses, queryParameters } from '../../schemas/openapi.js';
import { parseQuery } from '../../schemas/query.js';
import { checkSignedUrl, signingRequired } from '../../security/signing.js';
import { checkSource, checkUpload, requireBinding } from '../../security/ingest-binding.js';

export const ingestPath = '/v1/ingest';
export const jobsPrefix = '/v1/ingest/jobs/';

function mediaTypeError(request: FastifyRequest): FoldwiseError {
  const type = request.headers['content-type'] ?? 'a body without Content-Type';
  return new FoldwiseError(
    'ERR_INGEST_MEDIA_TYPE',
    `cannot ingest ${type}: send image/* or application/octet-stream bytes, multipart/form-data with one file field, or application/json {"source": "..."}`,
  );
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

  const bytesParser = (request: FastifyRequest, payload: IncomingMessage) => readUpload(payload, request.headers['content-length'], limit);
  app.addContentTypeParser(/^image\/[a-z0-9.+-]+$/i, bytesParser);
  // Bytes of no declared type: the format is sniffed from the bytes, as for image/*.
  app.addContentTypeParser('application/octet-stream', bytesParser);
  // multipart/form-data: parsed lazily by the handler (readMultipart), one file within the limit.
  await app.register(multipart, { limits: multipartLimits(limit) });
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

  async function workOf(request: FastifyRequest): Promise<{ work: IngestWork; callback?: string }> {
    const form = request.isMultipart() ? await readMultipart(request, limit) : undefined;
    const raw = { ...(request.query as Record<string, unknown>) };
    if (form && Object.keys(form.fields).length > 0) {
      // Form fields are not covered by the URL's signature: a signed upload takes none.
      if (signedRequests.has(request)) throw new FoldwiseError('ERR_INGEST_MULTIPART', 'a signed upload takes its parameters in the signed URL, not in form fields');
      for (const [name, value] of Object.entries(form.fields)) raw[name] = name in raw ? [raw[name], value].flat() : value;
    }
    const q = parseQuery(query, raw);
    const rendition: Record<string, string> = {};
    for (const name of ['prefilter', 'kernel', 'light'] as const) if (q[name] !== undefined) rendition[name] = q[name];
    const options = { widths: q.widths, formats: q.formats, rendition, sizes: q.sizes };
    const binding = { digest: q.digest, source: q.source };
    if (signedRequests.has(request)) requireBinding(binding);
    const body: unknown = form ? form.bytes : request.body;
    const callback = callbackOf(q.callback);
    // A callback makes the job asynchronous, so its bytes are checked and stored before the 202.
    const waits = callback !== undefined || prefersAsync(request.headers.prefer);
    if (Buffer.isBuffer(body)) return { work: await ingest.fromUpload(body, options, checkUpload(body, binding), waits), callback };
    if (body === undefined || body === null) throw new FoldwiseError('ERR_INGEST_EMPTY', 'the request has no body: send image bytes or JSON naming a source');
    if (!/^application\/json\b/i.test(request.headers['content-type'] ?? '')) throw mediaTypeError(request);
    const parsed = ingestSourceBody.safeParse(body);
    if (!parsed.success) throw new FoldwiseError('ERR_REQUEST_INVALID', `JSON body: ${parsed.error.issues[0].message}`);
    checkSource(parsed.data.source, binding);
    return { work: await ingest.fromSource(parsed.data.source, options), callback };
  }

  const queue = app.ingestQueue;
  const startJob = jobStarter(app);
  const allowed = parseAllowHosts(config.origin.upstream.allowHosts);

  /** The callback URL, when given: needs a key to sign with, and an allowlisted target. */
  function callbackOf(text: string | undefined): string | undefined {
    if (text === undefined) return undefined;
    if (keys.length === 0) throw new FoldwiseError('ERR_INGEST_CALLBACK_UNSIGNED', 'a callback needs signing.keys: its body is signed with the first key');
    return checkCallbackUrl(text, allowed).href;
  }

  async function post(request: FastifyRequest, reply: FastifyReply) {
    const { work, callback } = await workOf(request);
    reply.header('cache-control', 'no-store');
    // A callback makes the job asynchronous: its outcome goes to the callback either way.
    if (!callback && (!prefersAsync(request.headers.prefer) || ingest.isDone(work.key))) {
      return reply.send(await ingest.run(work).value);
    }
    const job = await startJob(work, callback);
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
            'Body: image bytes (image/* or application/octet-stream; or multipart/form-data with one file field and optional fields named as the query parameters; at most limits.maxUploadBytes) stored under a content-addressed key, or JSON {"source": "path/in/origin"}. With "Prefer: respond-async" the answer is 202 and Location names the job. With signing on, the signed query must name the body: digest (SHA-256 hex of the upload) or source (equal to the JSON body\'s source).',
          tags: ['ingest'],
          parameters: [
            // Comma lists: OpenAPI style form with explode false.
            ...queryParameters(query).map((p) => ({ ...(p as object), explode: false })),
            { name: 'Prefer', in: 'header', required: false, description: 'respond-async (RFC 7240)', schema: { type: 'string' } },
          ],
          requestBody: {
            content: {
              'image/*': {},
              'application/octet-stream': {},
              'multipart/form-data': { schema: { type: 'object', properties: { file: { type: 'string', format: 'binary' } } } },
              'application/json': { schema: { type: 'object', properties: { source: { type: 'string' } }, required: ['source'] } } },
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
          responses: { '200': jsonBody('The job', jobSchema), ...problemResponses(404, 503) },
        },
      },
    },
    async (request: FastifyRequest<{ Params: { id: string } }>, reply) => {
      const { id } = request.params;
      const job = queue
        ? await queue.get(id).catch((e: unknown) => {
            throw queueDown(e, config.pool.retryAfterSeconds);
          })
        : ingest.jobs.get(id);
      if (!job) throw new FoldwiseError('ERR_INGEST_JOB_NOT_FOUND', 'no ingest job with this id (finished jobs are forgotten after a while)');
      const { result, ...rest } = job;
      return reply.header('cache-control', 'no-store').send({ ...rest, manifest: result });
    },
  );
}

import type { FastifyError, FastifyInstance, FastifyReply, FastifyRequest } from 'fastify';
import fp from 'fastify-plugin';
import { errorCodes, type ErrorCode, FoldwiseError, isFoldwiseError } from '../../errors.js';
import { prefersHtml } from '../pages/accept.js';
import { problemPage } from '../pages/errors.js';
import { asPage } from '../pages/html.js';

/** RFC 9457 problem details plus our stable `code` and the request id for support. */
export interface Problem {
  type: string;
  title: string;
  status: number;
  detail: string;
  code: ErrorCode;
  requestId: string;
}

export const problemContentType = 'application/problem+json';

/** The problem `type` of a code: a reference into GET /docs/errors, which lists every code. */
export function problemType(code: ErrorCode): string {
  return `/docs/errors#${code}`;
}

/** Fastify's own errors by their code (content-type parsing: FST_ERR_CTP_*), onto ours. */
const fastifyErrorCodes: Record<string, ErrorCode> = {
  FST_ERR_CTP_INVALID_MEDIA_TYPE: 'ERR_REQUEST_MEDIA_TYPE',
  FST_ERR_CTP_INVALID_TYPE: 'ERR_REQUEST_MEDIA_TYPE',
  FST_ERR_CTP_EMPTY_TYPE: 'ERR_REQUEST_MEDIA_TYPE',
  FST_ERR_CTP_BODY_TOO_LARGE: 'ERR_REQUEST_TOO_LARGE',
  FST_ERR_CTP_INVALID_CONTENT_LENGTH: 'ERR_REQUEST_LENGTH_MISMATCH',
  FST_ERR_CTP_EMPTY_JSON_BODY: 'ERR_REQUEST_INVALID',
  FST_ERR_CTP_INVALID_JSON_BODY: 'ERR_REQUEST_INVALID',
};

/** The rest of Fastify's 4xx errors, mapped onto our codes by their status. */
const fastifyStatusCodes: Record<number, ErrorCode> = {
  400: 'ERR_REQUEST_INVALID',
  404: 'ERR_NOT_FOUND',
  405: 'ERR_METHOD_NOT_ALLOWED',
  408: 'ERR_REQUEST_TIMEOUT',
  413: 'ERR_REQUEST_TOO_LARGE',
  415: 'ERR_REQUEST_MEDIA_TYPE',
  431: 'ERR_REQUEST_HEADERS_TOO_LARGE',
};

/** Turns anything thrown into a FoldwiseError; unknown errors become ERR_INTERNAL (cause kept). */
export function toFoldwiseError(error: unknown): FoldwiseError {
  if (isFoldwiseError(error)) return error;
  const fe = error as Partial<FastifyError>;
  const code = (fe.code ? fastifyErrorCodes[fe.code] : undefined) ?? (fe.statusCode ? fastifyStatusCodes[fe.statusCode] : undefined);
  if (code) return new FoldwiseError(code, fe.message, { cause: error });
  return new FoldwiseError('ERR_INTERNAL', undefined, { cause: error });
}

/**
 * Sends `error` as problem details; a 5xx never shows its message, only its title. A client
 * that weighs text/html above JSON (a browser navigating) gets the same fields as a page.
 */
export function sendProblem(request: FastifyRequest, reply: FastifyReply, error: FoldwiseError): FastifyReply {
  const { title } = errorCodes[error.code];
  const body: Problem = {
    type: problemType(error.code),
    title,
    status: error.status,
    detail: error.status >= 500 && error.code === 'ERR_INTERNAL' ? title : error.message,
    code: error.code,
    requestId: String(request.id),
  };
  for (const [k, v] of Object.entries(error.headers ?? {})) reply.header(k, v);
  // Never let an error be cached as if it were the rendition (nor one form for the other).
  reply.header('cache-control', 'no-store');
  if (prefersHtml(request.headers.accept)) return asPage(reply.code(error.status)).send(problemPage(body));
  return reply.code(error.status).type(problemContentType).send(body);
}

/**
 * The error boundary: every thrown error and every unmatched route becomes RFC 9457 problem
 * details (application/problem+json) with a stable code. Stack traces go to the log, never to
 * the client; expected 4xx are logged at info, 5xx at error with their cause.
 */
async function errorsPlugin(app: FastifyInstance): Promise<void> {
  app.setErrorHandler((error, request, reply) => {
    const fw = toFoldwiseError(error);
    // Unexpected failures get the stack; expected refusals (4xx, overload 503s) a short line.
    // Nobody to answer: the client left, and the work it waited for was dropped or stopped.
    if (fw.code === 'ERR_REQUEST_ABANDONED') request.log.info({ code: fw.code, outcome: 'abandoned' }, fw.message);
    else if (fw.code === 'ERR_INTERNAL' || fw.code === 'ERR_RENDER_FAILED') {
      request.log.error({ err: fw.cause ?? fw, code: fw.code }, fw.message);
    } else if (fw.status >= 500) request.log.warn({ code: fw.code, detail: fw.message }, 'request refused');
    else request.log.info({ code: fw.code, detail: fw.message }, 'request refused');
    return sendProblem(request, reply, fw);
  });
  app.setNotFoundHandler((request, reply) =>
    sendProblem(request, reply, new FoldwiseError('ERR_NOT_FOUND', `no route for ${request.method} ${request.url.split('?')[0]}`)),
  );
}

export default fp(errorsPlugin, { name: 'foldwise-errors', fastify: '5.x' });

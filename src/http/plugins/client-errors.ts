import { randomUUID } from 'node:crypto';
import { STATUS_CODES } from 'node:http';
import type { Socket } from 'node:net';
import { errorCodes, type ErrorCode } from '../../errors.js';
import { problemContentType, problemType } from './errors.js';

/** Node's parser errors (llhttp's HPE_* codes, the request timeout) onto our codes. */
function codeOf(error: NodeJS.ErrnoException): ErrorCode {
  if (error.code === 'HPE_HEADER_OVERFLOW') return 'ERR_REQUEST_HEADERS_TOO_LARGE';
  if (error.code === 'ERR_HTTP_REQUEST_TIMEOUT') return 'ERR_REQUEST_TIMEOUT';
  return 'ERR_REQUEST_MALFORMED';
}

const details: Partial<Record<ErrorCode, string>> = {
  ERR_REQUEST_HEADERS_TOO_LARGE: 'the request line and headers exceed the server limit (16 KiB by default, Node --max-http-header-size)',
  ERR_REQUEST_TIMEOUT: 'the whole request was not received within server.requestTimeoutMs',
};

/**
 * Answers a request Node's HTTP parser refused before Fastify saw it (a Content-Length that is
 * not a number or given twice, oversize headers, a request that arrived too slowly) with the
 * same problem details as every other error, then closes the connection: after a framing
 * error the rest of the stream cannot be trusted (RFC 9112 section 6.3). Fastify's
 * `clientErrorHandler` (Node's 'clientError' event).
 */
export function clientErrorHandler(error: NodeJS.ErrnoException, socket: Socket): void {
  // A reset connection has nobody left to answer.
  if (error.code === 'ECONNRESET' || socket.destroyed) return;
  const code = codeOf(error);
  const { status, title } = errorCodes[code];
  const detail = details[code] ?? `the request could not be parsed (${error.code ?? 'parse error'})`;
  const body = JSON.stringify({ type: problemType(code), title, status, detail, code, requestId: randomUUID() });
  if (socket.writable) {
    socket.write(
      `HTTP/1.1 ${status} ${STATUS_CODES[status]}\r\nContent-Type: ${problemContentType}\r\nContent-Length: ${Buffer.byteLength(body)}\r\n` +
        `Cache-Control: no-store\r\nConnection: close\r\n\r\n${body}`,
    );
  }
  socket.destroy();
}

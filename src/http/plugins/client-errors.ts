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

/** Sockets already answered: Node's parser may report the same socket again as it drains. */
const answered = new WeakSet<Socket>();

/** How long, and how many more bytes, a refused request may still send before its socket is destroyed. */
const LINGER_MS = 2000;
const LINGER_BYTES = 1024 * 1024;

/**
 * Closes in stages (RFC 9112 section 9.6, "Tear-down"): the answer and our FIN first, then
 * the client's unread bytes read and dropped until it closes too, at most LINGER_BYTES or
 * LINGER_MS. Destroying the socket at once while the client's request was still arriving
 * (oversize headers: 64 KiB sent, 16 KiB parsed) makes the kernel send a reset, and the
 * client loses the answer it had not read yet (seen on Node 24, whose client reports the
 * reset before the closing of the connection).
 */
function lingeringClose(socket: Socket, answer: string): void {
  socket.end(answer);
  let drained = 0;
  const timer = setTimeout(() => socket.destroy(), LINGER_MS);
  timer.unref();
  socket.on('data', (chunk: Buffer) => {
    drained += chunk.length;
    if (drained > LINGER_BYTES) socket.destroy();
  });
  socket.on('close', () => clearTimeout(timer));
  socket.resume();
}

/**
 * Answers a request Node's HTTP parser refused before Fastify saw it (a Content-Length that is
 * not a number or given twice, oversize headers, a request that arrived too slowly) with the
 * same problem details as every other error, then closes the connection: after a framing
 * error the rest of the stream cannot be trusted (RFC 9112 section 6.3). Fastify's
 * `clientErrorHandler` (Node's 'clientError' event).
 */
export function clientErrorHandler(error: NodeJS.ErrnoException, socket: Socket): void {
  // A reset connection has nobody left to answer; an answered one has had its answer.
  if (error.code === 'ECONNRESET' || socket.destroyed || answered.has(socket)) return;
  answered.add(socket);
  const code = codeOf(error);
  const { status, title } = errorCodes[code];
  const detail = details[code] ?? `the request could not be parsed (${error.code ?? 'parse error'})`;
  const body = JSON.stringify({ type: problemType(code), title, status, detail, code, requestId: randomUUID() });
  if (!socket.writable) {
    socket.destroy();
    return;
  }
  lingeringClose(
    socket,
    `HTTP/1.1 ${status} ${STATUS_CODES[status]}\r\nContent-Type: ${problemContentType}\r\nContent-Length: ${Buffer.byteLength(body)}\r\n` +
      `Cache-Control: no-store\r\nConnection: close\r\n\r\n${body}`,
  );
}

import type { FastifyReply } from 'fastify';
import { FoldwiseError } from '../../errors.js';

/**
 * Aborts when the client goes away before the answer is written (its socket closed): the
 * reason is ERR_REQUEST_ABANDONED, so the work it waited for is dropped from the line, or
 * stopped at its next stage boundary when no one else waits for it (src/lib/single-flight.ts),
 * and the log says "abandoned", not a timeout.
 */
export function abandonSignal(reply: FastifyReply): AbortSignal {
  const controller = new AbortController();
  const res = reply.raw;
  const onClose = () => {
    if (!res.writableFinished) controller.abort(new FoldwiseError('ERR_REQUEST_ABANDONED', 'the client closed the connection before the answer'));
  };
  if (res.destroyed) onClose();
  else res.once('close', onClose);
  return controller.signal;
}

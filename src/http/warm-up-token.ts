import { randomUUID } from 'node:crypto';
import type { IncomingHttpHeaders } from 'node:http';

/**
 * Marks the warm-up's own requests through the rendition route (warm-path.ts): a header whose
 * value is new in every process, so no client can send it. The request and stage metrics leave
 * them out.
 */
const header = 'foldwise-warm-up';
const token = randomUUID();

/** The header a warm-up request carries. */
export const warmUpHeaders = (): Record<string, string> => ({ [header]: token });

/** Whether a request is one of this process's warm-up requests. */
export const isWarmUp = (headers: IncomingHttpHeaders): boolean => headers[header] === token;

import { type ErrorCode, FoldwiseError } from '../errors.js';

/** The pool's 503 refusals: a retry (later, or on another replica) can succeed. */
export type PoolRefusal = Extract<ErrorCode, 'ERR_RENDER_TIMEOUT' | 'ERR_SERVICE_STOPPING'>;

/** A 503 refusal with Retry-After: the deadline passed, or the pool is closing. */
export function refusal(code: PoolRefusal, detail: string, retryAfterSeconds: number, cause?: unknown): FoldwiseError {
  return new FoldwiseError(code, detail, { cause, headers: { 'retry-after': String(retryAfterSeconds) } });
}

/** ERR_OVERLOADED when resident memory passed the ceiling while jobs run. */
export function overRss(rssCeiling: number, retryAfterSeconds: number): FoldwiseError {
  const s = retryAfterSeconds;
  return new FoldwiseError('ERR_OVERLOADED', `resident memory is over ${rssCeiling} bytes while jobs run; retry in ${s} s`, {
    headers: { 'retry-after': String(s) },
  });
}

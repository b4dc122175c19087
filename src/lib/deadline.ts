/**
 * Deadlines for work that cannot be stopped from outside (a sharp decode, an encode): the caller
 * stops waiting when the deadline passes and gets `late()`; the work runs to its end and its
 * result is dropped. One helper, for both ways a deadline is given: an AbortSignal (a render's
 * budget, shared by its stages) or milliseconds from now (a decode). The worker threads' stop
 * flag is the cross-thread side of the same signal (pool/render-pool.ts).
 */

/** Settles like `work`, or rejects with `late()` once `deadline` aborts. */
export function withDeadline<T>(work: Promise<T>, deadline: AbortSignal, late: () => Error): Promise<T> {
  if (deadline.aborted) return Promise.reject(late());
  return new Promise<T>((resolve, reject) => {
    const onAbort = () => reject(late());
    deadline.addEventListener('abort', onAbort, { once: true });
    work.then(resolve, reject).finally(() => deadline.removeEventListener('abort', onAbort));
  });
}

/** `work`, or `late()` once `ms` have passed (no deadline when `ms` is undefined). */
export async function withinMs<T>(work: Promise<T>, ms: number | undefined, late: () => Error): Promise<T> {
  if (ms === undefined) return work;
  const clock = new AbortController();
  const timer = setTimeout(() => clock.abort(), ms);
  try {
    return await withDeadline(work, clock.signal, late);
  } finally {
    clearTimeout(timer);
  }
}

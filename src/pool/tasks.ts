/**
 * A signal of one pool call's own that follows the caller's: piscina's abort listener holds a
 * task (and the source it was given) as long as the signal it was given lives, 20 s for a
 * render deadline; this one lives as long as the call. `unlink` when the call ends.
 */
export function ownSignal(signal?: AbortSignal): { signal: AbortSignal; unlink: () => void } {
  const own = new AbortController();
  const relay = () => own.abort(signal?.reason);
  if (signal?.aborted) relay();
  signal?.addEventListener('abort', relay, { once: true });
  return { signal: own.signal, unlink: () => signal?.removeEventListener('abort', relay) };
}

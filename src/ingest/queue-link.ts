/**
 * The BullMQ connections' states that BullMQ itself does not wait for. Its `waitUntilReady`
 * resolves on the first connection's promise, kept for good: after Redis went away and came
 * back it answers at once while the client is still reconnecting, and a command sent then
 * fails ("Stream isn't writeable", the offline queue being off). Its `close` sends QUIT, which
 * fails the same way on such a client, and a worker's close waits for its blocking connection,
 * which may not be back (or is still between reconnect attempts) when the replica stops.
 */
import type { Queue, Worker } from 'bullmq';

interface Client {
  status: string;
  once(event: string, listener: () => void): unknown;
}

/** Resolves once the queue's Redis client is connected now (at once when it is). */
export async function queueReady(queue: Queue): Promise<void> {
  const client = (await queue.backend.client) as unknown as Client;
  if (client.status === 'ready') return;
  await new Promise<void>((resolve) => client.once('ready', resolve));
}

/**
 * Closes a queue or worker within `ms`: a close that fails (Redis away) or is still waiting
 * then is ended by dropping the connections, so a stopping replica never hangs on Redis.
 */
export async function closeWithin(target: Queue | Worker, ms: number, close: () => Promise<void> = () => target.close()): Promise<void> {
  let timer: NodeJS.Timeout | undefined;
  const late = new Promise<'late'>((resolve) => (timer = setTimeout(() => resolve('late'), Math.max(0, ms))));
  const outcome = await Promise.race([close().then(() => 'closed' as const, () => 'failed' as const), late]);
  clearTimeout(timer);
  if (outcome !== 'closed') await drop(target);
}

/**
 * Drops the connections without waiting for them to end: BullMQ's `disconnect` waits for an
 * 'end' event that a client between reconnect attempts never emits (it has no socket to close),
 * and ends a worker's blocking connection only after that wait. Dropping cancels the next
 * reconnect attempt, so nothing keeps retrying after the stop.
 */
async function drop(target: Queue | Worker): Promise<void> {
  const { client, blockingClient } = target.backend;
  for (const pending of [client, blockingClient]) (await pending?.catch(() => undefined))?.disconnect();
}

/** `work`, or a rejection after `ms` (BullMQ waits for a lost connection to return); a late answer is dropped. */
export function within<T>(work: Promise<T>, ms: number): Promise<T> {
  let timer: NodeJS.Timeout | undefined;
  const late = new Promise<never>((_, reject) => {
    timer = setTimeout(() => reject(new Error(`Redis did not answer within ${ms} ms`)), ms);
  });
  work.catch(() => undefined);
  return Promise.race([work, late]).finally(() => clearTimeout(timer));
}

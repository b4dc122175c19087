/**
 * The queue's terms: job ids, BullMQ states in the API's words, failures as BullMQ stores
 * them, the connection settings from a Redis URL, the error while Redis is away, and how a
 * job announces its end.
 */
import { createHash } from 'node:crypto';
import { FoldwiseError } from '../errors.js';
import type { JobState } from './jobs.js';
import type { Manifest } from './manifest.js';
import type { QueuedWork } from './queue.js';

/** The job's id: a digest of the work key and callback, so equal work is one job. */
export function jobIdOf(work: { key: string; callback?: string }): string {
  return `j${createHash('sha256').update(`${work.key}\n${work.callback ?? ''}`).digest('hex').slice(0, 32)}`;
}

/** BullMQ's states in the job vocabulary of the API. */
export const stateOf: Record<string, JobState> = { completed: 'done', failed: 'failed', active: 'running' };

/** A failure as a job keeps it: "CODE: detail" (the message BullMQ stores). */
export function encodeFailure(e: { code: string; detail: string }): string {
  return `${e.code}: ${e.detail}`;
}

export function decodeFailure(reason: string | undefined): { code: string; detail: string } {
  const m = /^(ERR_[A-Z0-9_]+): ([\s\S]*)$/.exec(reason ?? '');
  return m ? { code: m[1], detail: m[2] } : { code: 'ERR_INTERNAL', detail: 'Internal error' };
}

/** ioredis connection settings from a redis:// URL. */
export function connectionOf(url: string) {
  const u = new URL(url);
  return {
    host: u.hostname,
    port: Number(u.port || 6379),
    username: u.username ? decodeURIComponent(u.username) : undefined,
    password: u.password ? decodeURIComponent(u.password) : undefined,
    db: u.pathname.length > 1 ? Number(u.pathname.slice(1)) : undefined,
  };
}

/** The error a route answers while the queue's Redis is away. */
export function queueDown(cause: unknown, retryAfterSeconds: number): FoldwiseError {
  return new FoldwiseError('ERR_INGEST_QUEUE_DOWN', 'the job queue (Redis) cannot be reached; retry later', {
    cause,
    headers: { 'retry-after': String(retryAfterSeconds) },
  });
}

/** A job's end as it is announced: the manifest, or the failure that ends it for good. */
export type JobEnd = { state: 'done'; manifest: Manifest } | { state: 'failed'; error: { code: string; detail: string } };

/**
 * Announces a job's end (queues its callback); a rejection makes the attempt fail, to be
 * retried. `job.timestamp` (its creation) tells a run again of one job from a new job of the
 * same work made after the first expired.
 */
export type Announce = (job: { id: string; timestamp: number }, work: QueuedWork, end: JobEnd) => Promise<void>;

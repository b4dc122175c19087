/**
 * A queued job as the API shows it, whether its end is recorded, and when its result expires.
 */
import type { Job, Queue } from 'bullmq';
import type { JobView } from './jobs.js';
import type { Manifest } from './manifest.js';
import { decodeFailure, stateOf } from './queue-terms.js';

export async function viewOf(queue: Queue, fetched: Job): Promise<JobView<Manifest>> {
  let job = fetched;
  const state = stateOf[await job.getState()] ?? 'queued';
  // The job may have ended between its fetch and the state read: fetch it again for its result.
  if ((state === 'done' || state === 'failed') && !job.finishedOn) job = (await queue.getJob(job.id!)) ?? job;
  const view: JobView<Manifest> = { id: job.id!, state, createdAt: new Date(job.timestamp).toISOString() };
  if (job.finishedOn && (state === 'done' || state === 'failed')) view.finishedAt = new Date(job.finishedOn).toISOString();
  if (state === 'done') view.result = job.returnvalue as Manifest;
  if (state === 'failed') view.error = decodeFailure(job.failedReason);
  return view;
}

/**
 * Whether a finished job's result is `resultSeconds` old or more at `now`. BullMQ removes old
 * finished jobs only when another job finishes; a poll must not find one kept longer for want
 * of traffic.
 */
export function resultExpired(job: Job, resultSeconds: number, now: number): boolean {
  return job.finishedOn !== undefined && now - job.finishedOn >= resultSeconds * 1000;
}

/** Whether job `id`'s end is recorded (or it is gone). */
export async function jobEnded(queue: Queue, id: string): Promise<boolean> {
  const job = await queue.getJob(id);
  return !job || ['completed', 'failed'].includes(await job.getState());
}

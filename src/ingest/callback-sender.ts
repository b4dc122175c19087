/**
 * Sends job outcomes to callback URLs with retries and exponential backoff (1 s, 2 s, 4 s, …).
 * With Redis the retries live on a BullMQ queue ("callbacks"), so they survive the death of
 * the replica that started them; without Redis they are timers in this process (lost if it
 * stops, which the README says). Emits 'delivered' (jobId, status) and 'gave-up' (jobId, error).
 */
import { EventEmitter } from 'node:events';
import { DelayedError, type Job, Queue, Worker } from 'bullmq';
import { closeWithin } from './queue-link.js';
import { connectionOf } from './queue-terms.js';

export interface CallbackOutcome {
  job: string;
  state: 'done' | 'failed';
  finishedAt: string;
  manifest?: unknown;
  error?: { code: string; detail: string };
}

export interface SenderSettings {
  attempts: number;
  baseDelayMs: number;
  /**
   * Redis URL and key prefix for the shared retry queue; absent = in-process timers.
   * `closeMs`: the longest a close waits for Redis (away, or just back) before dropping it;
   * `lockMs`: a delivery's lock (a replica that died mid-delivery holds it at most this long).
   */
  shared?: { url: string; prefix: string; closeMs: number; lockMs: number };
}

type Deliver = (url: string, body: string) => Promise<number>;

interface Delivery {
  url: string;
  body: string;
  job: string;
}

export class CallbackSender extends EventEmitter {
  /**
   * On the shared queue, whether job `id`'s end is recorded: a callback queued inside its job
   * waits (delayed again, no attempt spent) until a poll would show the same outcome.
   */
  ended: (id: string) => Promise<boolean> = async () => true;
  private readonly queue?: Queue;
  private readonly worker?: Worker;
  private readonly timers = new Set<NodeJS.Timeout>();

  constructor(
    private readonly deliver: Deliver,
    private readonly settings: SenderSettings,
  ) {
    super();
    if (!settings.shared) return;
    const connection = connectionOf(settings.shared.url);
    const prefix = settings.shared.prefix;
    this.queue = new Queue('callbacks', { connection: { ...connection, enableOfflineQueue: false }, prefix });
    this.worker = new Worker('callbacks', async (job: Job, token?: string) => {
      const d = job.data as Delivery;
      if (!(await this.ended(d.job))) {
        await job.moveToDelayed(Date.now() + Math.min(settings.baseDelayMs, 100), token);
        throw new DelayedError();
      }
      return this.deliver(d.url, d.body);
    }, {
      connection: { ...connection, maxRetriesPerRequest: null },
      prefix,
      concurrency: 4,
      // A delivery whose replica died is taken over once its lock lapses (BullMQ's stalled check).
      lockDuration: settings.shared.lockMs,
      stalledInterval: settings.shared.lockMs,
    });
    this.queue.on('error', (e: Error) => this.emit('redis-error', e));
    this.worker.on('error', (e: Error) => this.emit('redis-error', e));
    this.worker.on('completed', (job: Job) => this.emit('delivered', (job.data as Delivery).job, job.returnvalue));
    this.worker.on('failed', (job: Job | undefined, e: Error) => {
      if (job?.finishedOn) this.emit('gave-up', (job.data as Delivery).job, e);
    });
  }

  /**
   * Queues the delivery of `outcome` to `url`. On the shared queue once per `once` (default
   * the job id): the same key queued again (a job run again after its replica died) is the
   * delivery already queued.
   */
  async send(url: string, outcome: CallbackOutcome, once = outcome.job): Promise<void> {
    const delivery: Delivery = { url, body: JSON.stringify(outcome), job: outcome.job };
    const { attempts, baseDelayMs } = this.settings;
    if (this.queue) {
      await this.queue.add('callback', delivery, {
        jobId: `${once}-callback`,
        attempts,
        backoff: { type: 'exponential', delay: baseDelayMs },
        removeOnComplete: { age: 3600 },
        removeOnFail: { age: 24 * 3600 },
      });
      return;
    }
    this.attempt(delivery, 1);
  }

  private attempt(d: Delivery, n: number): void {
    this.deliver(d.url, d.body).then(
      (status) => this.emit('delivered', d.job, status),
      (e: unknown) => {
        if (n >= this.settings.attempts) return void this.emit('gave-up', d.job, e);
        const timer = setTimeout(() => {
          this.timers.delete(timer);
          this.attempt(d, n + 1);
        }, this.settings.baseDelayMs * 2 ** (n - 1));
        timer.unref();
        this.timers.add(timer);
      },
    );
  }

  async close(): Promise<void> {
    for (const t of this.timers) clearTimeout(t);
    const ms = this.settings.shared?.closeMs ?? 0;
    if (this.worker) await closeWithin(this.worker, ms);
    if (this.queue) await closeWithin(this.queue, ms);
  }
}

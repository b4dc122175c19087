/**
 * Asynchronous ingest jobs on a BullMQ queue in Redis, so that every replica is the same:
 * any replica answers a status poll (state and result live in Redis), a replica that dies
 * mid-job has its job taken over by another once its lock lapses (BullMQ's stalled-job
 * check), and a replica that stops hands its unfinished jobs back to the queue. The work is
 * idempotent: the job id is derived from the work's key (content digest and options), so the
 * same upload twice is one job, and a job run twice renders into the same cache keys.
 * A job's end is announced (its callback queued) inside the job, before BullMQ records the
 * end: a replica that dies in between leaves the job to be run again and announced again
 * (at least once; the callback queue keeps one delivery per job id), never ended unannounced.
 */
import { EventEmitter } from 'node:events';
import { type Job, Queue, UnrecoverableError, Worker } from 'bullmq';
import type { JobView } from './jobs.js';
import { closeWithin, queueReady, within } from './queue-link.js';
import { type Announce, connectionOf, encodeFailure, jobIdOf } from './queue-terms.js';
import { jobEnded, resultExpired, viewOf } from './queue-view.js';
import type { Manifest } from './manifest.js';
import type { IngestOptions } from './service.js';

/** What a job carries: enough for any replica to do the work (no bytes; they are stored). */
export interface QueuedWork {
  key: string;
  source: string;
  options: IngestOptions;
  /** Where to POST the manifest or the error when the job ends (checked before enqueueing). */
  callback?: string;
}

export interface QueueSettings {
  url: string;
  /** Key prefix in Redis (the cache's namespace + "q"). */
  prefix: string;
  /** Unfinished jobs at most (waiting, delayed, running); past it `submit` answers undefined. */
  maxJobs: number;
  /** Finished jobs (done or failed) are kept this long for polls. */
  resultSeconds: number;
  /** A running job's lock; a replica that died holds it at most this long. */
  lockMs: number;
  /** Jobs one replica runs at once. */
  concurrency: number;
  /** Runs of one job at most, when it fails for a reason that may pass (5xx). */
  attempts: number;
  /** Longest wait for Redis when accepting or polling a job (it may be away). */
  timeoutMs: number;
  /** The clock finished jobs age by (tests pass their own). */
  now?: () => number;
}

const QUEUE = 'ingest';

export class IngestQueue extends EventEmitter {
  /** False once stopping began: `submit` refuses new jobs. */
  accepting = true;
  private readonly queue: Queue;
  private readonly worker: Worker;
  private readonly running = new Map<string, { job: Job; token?: string }>();

  constructor(
    private readonly settings: QueueSettings,
    run: (work: QueuedWork) => Promise<Manifest>,
    describe: (e: unknown) => { code: string; detail: string; status: number },
    announce: Announce = async () => undefined,
  ) {
    super();
    const connection = connectionOf(settings.url);
    // The queue side fails fast while Redis is away (a poll gets a 503), never waits in a buffer.
    this.queue = new Queue(QUEUE, { connection: { ...connection, enableOfflineQueue: false }, prefix: settings.prefix });
    this.queue.on('error', (e) => this.emit('redis-error', e));
    this.worker = new Worker(
      QUEUE,
      async (job: Job, token?: string) => {
        this.running.set(job.id!, { job, token });
        const work = job.data as QueuedWork;
        let manifest: Manifest;
        try {
          manifest = await run(work);
        } catch (e) {
          const failure = describe(e);
          // A refusal (4xx: corrupt picture, bad parameters) fails for good; the rest is retried.
          const final = failure.status < 500 || job.attemptsMade + 1 >= (job.opts.attempts ?? 1);
          if (final) await announce({ id: job.id!, timestamp: job.timestamp }, work, { state: 'failed', error: { code: failure.code, detail: failure.detail } });
          throw failure.status < 500 ? new UnrecoverableError(encodeFailure(failure)) : new Error(encodeFailure(failure));
        } finally {
          this.running.delete(job.id!);
          if (this.running.size === 0) this.emit('idle');
        }
        await announce({ id: job.id!, timestamp: job.timestamp }, work, { state: 'done', manifest });
        return manifest;
      },
      {
        connection: { ...connection, maxRetriesPerRequest: null },
        prefix: settings.prefix,
        concurrency: settings.concurrency,
        lockDuration: settings.lockMs,
        stalledInterval: settings.lockMs,
        maxStalledCount: 2,
      },
    );
    this.worker.on('error', (e) => this.emit('redis-error', e));
    this.worker.on('completed', (job: Job) => this.emit('settled', job.id, 'done', job));
    this.worker.on('failed', (job: Job | undefined) => {
      // Only the last failure settles the job; earlier ones wait for their retry.
      if (job?.finishedOn) this.emit('settled', job.id, 'failed', job);
    });
  }

  /** Queues the work (or finds the same work's job); undefined when the queue is full. */
  submit(work: QueuedWork): Promise<JobView<Manifest> | undefined> {
    return this.bounded(this.add(work));
  }

  private async add(work: QueuedWork): Promise<JobView<Manifest> | undefined> {
    // Redis just came back: wait for the reconnect (bounded by `submit`) rather than fail.
    await queueReady(this.queue);
    const id = jobIdOf(work);
    const existing = await this.queue.getJob(id);
    if (existing && ((await existing.getState()) === 'failed' || this.expired(existing))) await existing.remove();
    else if (existing) return viewOf(this.queue, existing);
    const counts = await this.queue.getJobCounts('waiting', 'active', 'delayed', 'prioritized');
    if (Object.values(counts).reduce((a, b) => a + b, 0) >= this.settings.maxJobs) return undefined;
    const job = await this.queue.add('ingest', work, {
      jobId: id,
      attempts: this.settings.attempts,
      backoff: { type: 'exponential', delay: 1000 },
      removeOnComplete: { age: this.settings.resultSeconds },
      removeOnFail: { age: this.settings.resultSeconds },
    });
    return viewOf(this.queue, job);
  }

  /** Jobs this replica's worker runs now. */
  get runningCount(): number {
    return this.running.size;
  }

  /** Resolves once the queue's Redis connection is up (again): connected now, not once. */
  async ready(): Promise<void> {
    await this.queue.waitUntilReady();
    await queueReady(this.queue);
  }

  /** Whether job `id`'s end is recorded (or it is gone): a poll shows its outcome. */
  ended(id: string): Promise<boolean> {
    return jobEnded(this.queue, id);
  }

  /** The job as the API shows it; undefined when unknown or expired. */
  async get(id: string): Promise<JobView<Manifest> | undefined> {
    if (!/^j[0-9a-f]{32}$/.test(id)) return undefined;
    const job = await this.bounded(queueReady(this.queue).then(() => this.queue.getJob(id)));
    if (job && this.expired(job)) {
      await this.bounded(job.remove()).catch(() => undefined);
      return undefined;
    }
    return job ? this.bounded(viewOf(this.queue, job)) : undefined;
  }

  private expired = (job: Job): boolean => resultExpired(job, this.settings.resultSeconds, this.settings.now?.() ?? Date.now());

  /** BullMQ waits for a lost connection to return; a request must not wait that long. */
  private bounded<T>(work: Promise<T>): Promise<T> {
    return within(work, this.settings.timeoutMs);
  }

  /**
   * Stops taking jobs; running ones get until `deadlineMs` to finish, then each is handed
   * back to the queue (first in line for another replica) and this replica's worker stops.
   * Returns the ids handed back.
   */
  async close(deadlineMs: number): Promise<string[]> {
    this.accepting = false;
    // Take no new job, but leave the running ones be (BullMQ's close() would wait for them all).
    await this.worker.pause(true).catch(() => undefined);
    let timer: NodeJS.Timeout | undefined;
    const deadline = new Promise<void>((resolve) => (timer = setTimeout(resolve, Math.max(0, deadlineMs))));
    const idle = new Promise<void>((resolve) => (this.running.size === 0 ? resolve() : this.once('idle', resolve)));
    await Promise.race([idle, deadline]);
    clearTimeout(timer);
    const handed: string[] = [];
    for (const [id, { job, token }] of this.running) {
      // Its lock released and first in line: another replica takes it at once.
      await this.bounded(job.moveToWait(token)).then(() => handed.push(id), () => undefined);
    }
    // Redis may be away or just back: neither close may hold the shutdown past its wait.
    await closeWithin(this.worker, this.settings.timeoutMs, () => this.worker.close(true));
    await closeWithin(this.queue, this.settings.timeoutMs);
    return handed;
  }
}

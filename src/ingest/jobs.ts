/**
 * The table of asynchronous ingest jobs (for `Prefer: respond-async`, RFC 7240).
 *
 * Bounded: when full, the oldest finished job is forgotten; when every slot holds unfinished
 * work, `start` refuses (the caller answers 503) rather than letting the table grow. Each job
 * emits `settled` on the table when it ends, so waiters and tests synchronise on an event.
 * At shutdown, `drain` stops new jobs and waits for the unfinished ones up to a deadline; a
 * job still unfinished then is marked failed with a stable code, never dropped silently.
 */
import { EventEmitter } from 'node:events';
import { randomUUID } from 'node:crypto';

export type JobState = 'queued' | 'running' | 'done' | 'failed';

export interface JobView<T> {
  id: string;
  state: JobState;
  createdAt: string;
  finishedAt?: string;
  result?: T;
  /** For failed jobs: the error code and a sentence for people (never a stack). */
  error?: { code: string; detail: string };
}

export class JobTable<T> extends EventEmitter {
  private readonly jobs = new Map<string, JobView<T>>();
  /** False once draining began: `start` refuses every new job. */
  accepting = true;

  constructor(private readonly capacity: number) {
    super();
    if (!(capacity >= 1)) throw new RangeError(`capacity must be >= 1, got ${capacity}`);
  }

  get size(): number {
    return this.jobs.size;
  }

  get(id: string): JobView<T> | undefined {
    return this.jobs.get(id);
  }

  /**
   * Registers a job and runs `work` in the background; returns the job, or `undefined` when
   * the table is full of unfinished jobs. The job is `queued` until `work` calls `started`.
   * `describe` turns a failure into code and detail.
   */
  start(
    work: (started: () => void) => Promise<T>,
    describe: (e: unknown) => { code: string; detail: string },
  ): JobView<T> | undefined {
    if (!this.accepting || (this.jobs.size >= this.capacity && !this.evictOneFinished())) return undefined;
    const job: JobView<T> = { id: randomUUID(), state: 'queued', createdAt: new Date().toISOString() };
    this.jobs.set(job.id, job);
    const started = (): void => {
      if (job.state === 'queued') job.state = 'running';
    };
    queueMicrotask(() => {
      work(started).then(
        (result) => this.finish(job, { state: 'done', result }),
        (e: unknown) => this.finish(job, { state: 'failed', error: describe(e) }),
      );
    });
    return job;
  }

  /** Resolves with the job once it is done or failed (immediately if it already is). */
  settled(id: string): Promise<JobView<T> | undefined> {
    const job = this.jobs.get(id);
    if (!job || job.state === 'done' || job.state === 'failed') return Promise.resolve(job);
    return new Promise((resolve) => {
      const onSettled = (settledId: string): void => {
        if (settledId !== id) return;
        this.off('settled', onSettled);
        resolve(this.jobs.get(id) ?? job);
      };
      this.on('settled', onSettled);
    });
  }

  /**
   * Stops accepting jobs and waits until every unfinished one settles or `deadlineMs` passes.
   * Jobs unfinished at the deadline are marked failed with `abandoned` (a later result of
   * their work is ignored) and returned, so the caller can log them.
   */
  async drain(deadlineMs: number, abandoned: { code: string; detail: string }): Promise<JobView<T>[]> {
    this.accepting = false;
    const unfinished = () => [...this.jobs.values()].filter((j) => j.state === 'queued' || j.state === 'running');
    let timer: NodeJS.Timeout | undefined;
    const deadline = new Promise<void>((resolve) => (timer = setTimeout(resolve, Math.max(0, deadlineMs))));
    await Promise.race([Promise.all(unfinished().map((j) => this.settled(j.id))), deadline]);
    clearTimeout(timer);
    const left = unfinished();
    for (const job of left) this.finish(job, { state: 'failed', error: abandoned });
    return left;
  }

  private finish(job: JobView<T>, patch: Partial<JobView<T>>): void {
    // A job marked failed at a drain deadline keeps that state when its work ends later.
    if (job.state === 'done' || job.state === 'failed') return;
    Object.assign(job, patch, { finishedAt: new Date().toISOString() });
    this.emit('settled', job.id);
  }

  private evictOneFinished(): boolean {
    for (const [id, job] of this.jobs) {
      if (job.state === 'done' || job.state === 'failed') {
        this.jobs.delete(id);
        return true;
      }
    }
    return false;
  }
}

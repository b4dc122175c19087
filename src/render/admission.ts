import { FoldwiseError } from '../errors.js';

/**
 * Admission control for renders: `permits` renders run at once (read, decode, resample: the
 * stages that hold pixels), at most `maxWaiting` more wait in line, first come first served,
 * holding nothing yet; anyone past that is refused at once with ERR_OVERLOADED (503 and
 * Retry-After). So memory is bounded by `permits` decoded sources, not by the traffic.
 */
export class Admission {
  private running = 0;
  private readonly line: Array<() => void> = [];

  constructor(
    readonly permits: number,
    readonly maxWaiting: number,
    private readonly retryAfterSeconds: number,
  ) {
    if (!(permits >= 1 && Number.isInteger(permits))) throw new RangeError('permits must be a positive integer');
    if (!(maxWaiting >= 0 && Number.isInteger(maxWaiting))) throw new RangeError('maxWaiting must be an integer >= 0');
  }

  /** Renders holding a permit or waiting for one. */
  get inFlight(): number {
    return this.running + this.line.length;
  }

  /** Renders waiting for a permit. */
  get waiting(): number {
    return this.line.length;
  }

  /** Most renders in flight before refusals start. */
  get bound(): number {
    return this.permits + this.maxWaiting;
  }

  /**
   * Resolves with a release function once a permit is free; call it when the pixel-holding
   * stages are done (extra calls are ignored). Throws ERR_OVERLOADED when the line is full.
   */
  async admit(): Promise<() => void> {
    if (this.running < this.permits) {
      this.running += 1;
      return this.releaser();
    }
    if (this.line.length >= this.maxWaiting) {
      const s = this.retryAfterSeconds;
      throw new FoldwiseError('ERR_OVERLOADED', `all ${this.bound} render slots are busy; retry in ${s} s`, {
        headers: { 'retry-after': String(s) },
      });
    }
    await new Promise<void>((resolve) => this.line.push(resolve));
    return this.releaser(); // the permit was handed over by its previous holder
  }

  private releaser(): () => void {
    let released = false;
    return () => {
      if (released) return;
      released = true;
      const next = this.line.shift();
      if (next) next();
      else this.running -= 1;
    };
  }
}

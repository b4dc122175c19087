import type { Plan } from '../core/types.js';
import type { BandOutcome, SharedRaster, SpooledRaster } from './worker.js';
import type { RunBand } from './runner.js';

/**
 * Rows left below which a band keeps them: handing them over costs a task hand-off and a new
 * window of source rows, about what 48 rows of an 800 px rendition take (common practice:
 * a split pays when each half is several hand-offs long; revisit with scripts/bench/timeline.ts).
 */
export const REST_MIN_ROWS = 48;

/** When a spooled render's band may hand over the rest of its rows (bands.ts). */
export interface RestHandOver {
  /** Settles when the source's last row is written: from then on the band is no longer paced by the decode. */
  decoded: Promise<unknown>;
  /** Resolves once a pool thread is free (PoolThreads.whenIdle). */
  idle: () => Promise<void>;
  /**
   * Resolves true to call the band off: its end is lowered to where it is (it stops after the
   * row it is making, its output incomplete) and no rest is handed over. A band rendered on the
   * kernel's plan while prefilter=auto decides is called off when the decision adapts the plan.
   */
  callOff?: Promise<boolean>;
}

/**
 * The hand-over of a band rendered on the kernel's plan while prefilter=auto decides beside
 * it (a finished spool file: nothing paces the band but the decision): its rest is handed to a
 * free thread once `callOff` resolves false (the decision keeps the plan); resolving true calls
 * it off.
 */
export function whileDeciding(callOff: Promise<boolean>, idle: () => Promise<void>): RestHandOver {
  const decoded = callOff.then((off) => (off ? Promise.reject(new Error('called off')) : undefined));
  // Handled here too: a render refused before its band starts never reads it.
  decoded.catch(() => undefined);
  return { decoded, idle, callOff };
}

/**
 * One band of output rows [r0, r1) of a source still being decoded, whose rest is handed to a
 * second thread once the decode has ended and a thread is free. While the decode runs, one
 * band keeps pace with it and the other thread stays free (for the analysis, or another
 * render); once the last row is written the band is bound by its own work only, and a band
 * that lags behind the decode would leave a core idle for the rest of it. Then the band's end
 * is lowered to the middle of the rows it has not made (a live band, worker.ts) and a second
 * task makes the rows from there. The rows are the same whichever band makes them (bands give
 * exactly the rows of the whole, stream.ts), so the bytes do not change; at most the row at
 * the split is made by both, with the same values.
 *
 * Returns the tasks' outcomes: the band's, and the rest's (zero rows when nothing was handed over).
 */
export function bandWithRest(
  runBand: RunBand,
  src: SharedRaster | SpooledRaster,
  plan: Plan,
  out: SharedArrayBuffer,
  [r0, r1]: [number, number],
  rest: RestHandOver,
  signal: AbortSignal,
): Promise<BandOutcome>[] {
  const live = new SharedArrayBuffer(8);
  const at = new Int32Array(live);
  at[0] = r0;
  at[1] = r1;
  let settled = false;
  let calledOff = false;
  const first = runBand({ src, plan, rows: [r0, r1], out, live }, { signal });
  const ended = first.then(() => 'band' as const, () => 'band' as const);
  void ended.then(() => (settled = true));
  void rest.callOff?.then((off) => {
    if (!off || settled) return;
    calledOff = true;
    Atomics.store(at, 1, 0);
  }, () => undefined);
  const none: BandOutcome = { kind: 'done', rows: 0 };
  const free = rest.decoded.then(rest.idle).then(() => 'free' as const, () => 'band' as const);
  const second = Promise.race([ended, free]).then((why): Promise<BandOutcome> | BandOutcome => {
    if (why === 'band' || settled || calledOff || signal.aborted) return none;
    const next = Atomics.load(at, 0);
    if (r1 - next < REST_MIN_ROWS) return none;
    const split = next + ((r1 - next + 1) >> 1);
    Atomics.store(at, 1, split);
    return runBand({ src, plan, rows: [split, r1], out }, { signal }).then(async (o) => {
      const made = await first;
      // The band checks its end before each row, so it cannot stop short of the split.
      if (made.kind === 'done' && o.kind === 'done' && r0 + made.rows < split) throw new Error(`a band stopped at row ${r0 + made.rows}, before the rest it handed over (${split})`);
      return o;
    });
  });
  return [first, second];
}

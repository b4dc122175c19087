import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makePlan } from '../../src/core/index.js';
import type { PixelRaster, Plan } from '../../src/core/types.js';
import { RenderPool } from '../../src/pool/render-pool.js';
import { bandWithRest, REST_MIN_ROWS, whileDeciding } from '../../src/pool/rest-band.js';
import { piscinaRunner, type RunBand } from '../../src/pool/runner.js';
import type { BandOutcome, ResampleTask } from '../../src/pool/worker.js';

const plan = (sw: number, sh: number, tw: number, th: number): Plan =>
  makePlan({ sourceWidth: sw, sourceHeight: sh, targetWidth: tw, targetHeight: th, kernel: 'auto', prefilter: 'auto', light: 'linear' });

const bytes = (r: PixelRaster) => Buffer.from(r.data.buffer, r.data.byteOffset, r.data.byteLength);

function deferred<T = void>() {
  let resolve!: (v: T) => void;
  const promise = new Promise<T>((r) => (resolve = r));
  return { promise, resolve };
}

/** A band task on the test's thread: it says where it is (live[0]) and ends when told, with the rows up to its live end. */
function fakeBands() {
  const tasks: ResampleTask[] = [];
  const finish: Array<() => void> = [];
  const runBand: RunBand = (task) => {
    tasks.push(task);
    const done = deferred();
    finish.push(done.resolve);
    return done.promise.then((): BandOutcome => {
      const end = task.live ? Math.min(task.rows[1], new Int32Array(task.live)[1]) : task.rows[1];
      return { kind: 'done', rows: end - task.rows[0] };
    });
  };
  return { tasks, finish, runBand };
}

const src = { path: '/nowhere.v', width: 1000, height: 800, channels: 3 as const, depth: 8 as const, state: new SharedArrayBuffer(4) };
const p = plan(1000, 800, 400, 320);
const out = new SharedArrayBuffer(4);

describe('bandWithRest (a lagging band hands its rest to a free thread once the decode ends)', () => {
  it('once the decode has ended and a thread is free, the band stops mid-way and a second task makes the rest', async () => {
    const { tasks, finish, runBand } = fakeBands();
    const decoded = deferred();
    const idle = deferred();
    const [first, rest] = bandWithRest(runBand, src, p, out, [0, 320], { decoded: decoded.promise, idle: () => idle.promise }, new AbortController().signal);
    expect(tasks.map((t) => t.rows)).toEqual([[0, 320]]);
    const live = new Int32Array(tasks[0].live!);
    Atomics.store(live, 0, 100); // the band is about to make row 100
    decoded.resolve();
    await decoded.promise;
    // The decode is over but no thread is free yet: nothing is handed over.
    await Promise.resolve();
    expect(tasks).toHaveLength(1);
    idle.resolve();
    await idle.promise;
    await new Promise((r) => setImmediate(r));
    expect(tasks.map((t) => t.rows)).toEqual([[0, 320], [210, 320]]);
    expect(tasks[1].live).toBeUndefined();
    expect(Atomics.load(live, 1)).toBe(210);
    finish[1]();
    finish[0]();
    expect(await first).toEqual({ kind: 'done', rows: 210 });
    expect(await rest).toEqual({ kind: 'done', rows: 110 });
  });

  it('a band that ends before the decode does hands nothing over', async () => {
    const { tasks, finish, runBand } = fakeBands();
    const decoded = deferred();
    const [first, rest] = bandWithRest(runBand, src, p, out, [0, 320], { decoded: decoded.promise, idle: () => Promise.resolve() }, new AbortController().signal);
    finish[0]();
    expect(await first).toEqual({ kind: 'done', rows: 320 });
    decoded.resolve();
    expect(await rest).toEqual({ kind: 'done', rows: 0 });
    expect(tasks).toHaveLength(1);
  });

  it(`fewer than ${REST_MIN_ROWS} rows left stay with the band; a failed decode hands nothing over`, async () => {
    for (const [at, decode] of [[320 - REST_MIN_ROWS + 1, 'ok'], [0, 'failed']] as const) {
      const { tasks, finish, runBand } = fakeBands();
      const decoded = decode === 'ok' ? Promise.resolve() : Promise.reject(new Error('corrupt'));
      const [first, rest] = bandWithRest(runBand, src, p, out, [0, 320], { decoded, idle: () => Promise.resolve() }, new AbortController().signal);
      Atomics.store(new Int32Array(tasks[0].live!), 0, at);
      expect(await rest).toEqual({ kind: 'done', rows: 0 });
      finish[0]();
      expect(await first).toEqual({ kind: 'done', rows: 320 });
      expect(tasks).toHaveLength(1);
    }
  });

  /** A band beside a decision, about to make row `row`. */
  function besideDecision(row: number) {
    const bands = fakeBands();
    const callOff = deferred<boolean>();
    const [first, rest] = bandWithRest(bands.runBand, src, p, out, [0, 320], whileDeciding(callOff.promise, () => Promise.resolve()), new AbortController().signal);
    const live = new Int32Array(bands.tasks[0].live!);
    Atomics.store(live, 0, row);
    return { ...bands, callOff, first, rest, live };
  }

  it('a band called off (the decision beside it adapted the plan) stops after its current row and hands nothing over', async () => {
    const { tasks, finish, callOff, first, rest, live } = besideDecision(37);
    callOff.resolve(true);
    expect(await rest).toEqual({ kind: 'done', rows: 0 });
    // Its end is lowered below the row it is making: it makes no further row.
    expect(Atomics.load(live, 1)).toBe(0);
    finish[0]();
    expect(await first).toEqual({ kind: 'done', rows: 0 });
    expect(tasks).toHaveLength(1);
  });

  it('a band the decision keeps hands its rest over as a decoded band does', async () => {
    const { tasks, finish, callOff, first, rest } = besideDecision(100);
    callOff.resolve(false);
    await new Promise((r) => setImmediate(r));
    expect(tasks.map((t) => t.rows)).toEqual([[0, 320], [210, 320]]);
    finish[1]();
    finish[0]();
    expect(await first).toEqual({ kind: 'done', rows: 210 });
    expect(await rest).toEqual({ kind: 'done', rows: 110 });
  });
});

/** 1200 x 900 RGB of seeded noise (a linear congruential generator's high bytes). */
function noiseRaw(seed: number): Buffer {
  const raw = Buffer.alloc(1200 * 900 * 3);
  for (let i = 0, s = seed; i < raw.length; i++) raw[i] = (s = (Math.imul(s, 1664525) + 1013904223) >>> 0) >>> 24;
  return raw;
}

/** A two-thread spooling pool whose band tasks are recorded in `tasks`, each let in once `door(task)` settles. */
function doorPool(tasks: ResampleTask[], door: (task: ResampleTask) => Promise<unknown> | undefined): RenderPool {
  return new RenderPool({
    threads: 2, maxQueue: 0, retryAfterSeconds: 1, spoolDir: 'auto',
    runner: (piscina) => {
      const run = piscinaRunner(piscina);
      return async (task, options) => {
        tasks.push(task);
        await door(task);
        return run(task, options);
      };
    },
  });
}

describe('RenderPool.resampleSpooled hands a lagging band\'s rest over: the same bytes', () => {
  const held = deferred();
  const tasks: ResampleTask[] = [];
  let pool: RenderPool;
  beforeAll(() => {
    // The first band task waits at the pool's door until the test lets it in: it has made no
    // row when the decode ends, so half of it is handed over.
    pool = doorPool(tasks, () => (tasks.length === 1 ? held.promise : undefined));
  });
  afterAll(() => pool.close());

  it('4x+ shrink (one band, paced by the decode): split at the middle once written, rows equal to the in-memory render', async () => {
    const raw = noiseRaw(3);
    const shape = { width: 1200, height: 900, channels: 3 as const, depth: 8 as const };
    const theirs = plan(1200, 900, 417, 313);
    const path = pool.spool!.path();
    try {
      await sharp(raw, { raw: { width: 1200, height: 900, channels: 3 } }).toFile(path);
      const written = Promise.resolve();
      const render = pool.resampleSpooled(path, shape, written, theirs);
      await written;
      // The rest is handed over while the first band still waits at the door.
      while (tasks.length < 2) await new Promise((r) => setImmediate(r));
      held.resolve();
      const got = await render;
      expect(tasks.map((t) => [t.rows, t.live !== undefined])).toEqual([[[0, 313], true], [[157, 313], false]]);
      const direct = await pool.resample({ data: new Uint8Array(raw), ...shape }, theirs);
      expect(bytes(got).equals(bytes(direct))).toBe(true);
    } finally {
      await pool.spool!.remove(path);
    }
  });
});

describe('RenderPool.resampleSpooled of a finished file while the decision is made beside it', () => {
  const tasks: ResampleTask[] = [];
  const door = { held: deferred() };
  let pool: RenderPool;
  beforeAll(() => {
    // Each test's first band task waits at the pool's door until the test lets it in.
    pool = doorPool(tasks, (task) => (task.live ? door.held.promise : undefined));
  });
  afterAll(() => pool.close());

  const shape = { width: 1200, height: 900, channels: 3 as const, depth: 8 as const };
  const theirs = plan(1200, 900, 417, 313);
  const raw = noiseRaw(5);

  async function beside(off: boolean): Promise<PixelRaster> {
    tasks.length = 0;
    door.held = deferred();
    const path = pool.spool!.path();
    try {
      await sharp(raw, { raw: { width: 1200, height: 900, channels: 3 } }).toFile(path);
      const callOff = deferred<boolean>();
      const render = pool.resampleSpooled(path, shape, Promise.resolve(), theirs, undefined, { callOff: callOff.promise });
      while (tasks.length < 1) await new Promise((r) => setImmediate(r));
      callOff.resolve(off);
      // A kept plan's rest is handed over while the band still waits at the door.
      if (!off) while (tasks.length < 2) await new Promise((r) => setImmediate(r));
      door.held.resolve();
      return await render;
    } finally {
      await pool.spool!.remove(path);
    }
  }

  it('kept: one band, its rest handed over once decided, the bytes of the in-memory render', async () => {
    const got = await beside(false);
    expect(tasks.map((t) => [t.rows, t.live !== undefined])).toEqual([[[0, 313], true], [[157, 313], false]]);
    const direct = await pool.resample({ data: new Uint8Array(raw), ...shape }, theirs);
    expect(bytes(got).equals(bytes(direct))).toBe(true);
  });

  it('called off: the band stops after the row it is making (a band makes at least its first), and nothing is handed over', async () => {
    const got = await beside(true);
    expect(tasks.map((t) => t.rows)).toEqual([[0, 313]]);
    const row = 417 * 3;
    expect(got.data.subarray(0, row).some((v) => v !== 0)).toBe(true);
    expect(got.data.subarray(row).every((v) => v === 0)).toBe(true);
  });
});

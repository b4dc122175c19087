import { describe, expect, it } from 'vitest';
import { MemoryBudget } from '../../src/pool/budget.js';
import { FoldwiseError } from '../../src/errors.js';

const MiB = 2 ** 20;
const budget = (over: Partial<ConstructorParameters<typeof MemoryBudget>[0]> = {}) =>
  new MemoryBudget({ budgetBytes: 100 * MiB, maxRunning: 4, maxWaiting: 4, maxWaitMs: 60_000, retryAfterSeconds: 3, ...over });

describe('MemoryBudget', () => {
  it('admits while the bytes fit, first come first served; the sum never passes the budget and returns to 0', async () => {
    const b = budget();
    const a = await b.acquire(60 * MiB, 'a');
    const order: string[] = [];
    const big = b.acquire(50 * MiB, 'big').then((l) => (order.push('big'), l));
    // Fits by bytes, but waits behind the larger job at the head of the line.
    const small = b.acquire(10 * MiB, 'small').then((l) => (order.push('small'), l));
    expect(b.state).toMatchObject({ admittedBytes: 60 * MiB, waiting: 2, running: 1 });
    a.release();
    const [l1, l2] = await Promise.all([big, small]);
    expect(order).toEqual(['big', 'small']);
    expect(b.state.admittedBytes).toBe(60 * MiB);
    l1.release();
    l2.release();
    l2.release(); // a second release is ignored
    expect(b.state).toMatchObject({ admittedBytes: 0, running: 0, waiting: 0, peakAdmittedBytes: 60 * MiB });
  });

  it('a job larger than the budget: 413 ERR_SOURCE_TOO_COSTLY with both numbers in the detail', async () => {
    const e = await budget().acquire(150 * MiB, 'a 8192x8192 source').catch((x: unknown) => x);
    expect(e).toBeInstanceOf(FoldwiseError);
    expect((e as FoldwiseError).code).toBe('ERR_SOURCE_TOO_COSTLY');
    expect((e as FoldwiseError).status).toBe(413);
    expect((e as FoldwiseError).message).toContain(String(150 * MiB));
    expect((e as FoldwiseError).message).toContain(String(100 * MiB));
  });

  it('a wait past maxWaitMs: 503 ERR_OVERLOADED with Retry-After, and the line is empty again', async () => {
    const b = budget({ maxWaitMs: 1 });
    const held = await b.acquire(90 * MiB, 'held');
    const e = (await b.acquire(20 * MiB, 'late').catch((x: unknown) => x)) as FoldwiseError;
    expect(e.code).toBe('ERR_OVERLOADED');
    expect(e.headers).toEqual({ 'retry-after': '3' });
    expect(b.state.waiting).toBe(0);
    held.release();
    expect(b.state.admittedBytes).toBe(0);
  });

  it('a full line refuses at once; the count bound holds too', async () => {
    const b = budget({ maxRunning: 1, maxWaiting: 0 });
    const held = await b.acquire(1, 'one');
    await expect(b.acquire(1, 'two')).rejects.toMatchObject({ code: 'ERR_OVERLOADED' });
    held.release();
  });

  it('reserve: while no job can start at once, one job per free place in line may read its source; the next gets the 503 unread', async () => {
    const b = budget({ maxRunning: 1, maxWaiting: 2 });
    const refusal = () => {
      try {
        b.reserve().release();
      } catch (e) {
        return e;
      }
      return undefined;
    };
    const held = await b.acquire(1, 'running');
    const r1 = b.reserve();
    const r2 = b.reserve();
    expect(refusal()).toMatchObject({ code: 'ERR_OVERLOADED', status: 503, headers: { 'retry-after': '3' }, message: expect.stringContaining('0 jobs are already waiting for memory and 2 reading their sources') });
    // A reserved job takes its place in line; a released reservation frees one.
    const w1 = b.acquire(1, 'reserved 1', undefined, r1);
    expect(b.state).toMatchObject({ running: 1, waiting: 1 });
    expect(refusal()).toMatchObject({ code: 'ERR_OVERLOADED' });
    r1.release(); // taken by acquire already: nothing changes
    expect(refusal()).toMatchObject({ code: 'ERR_OVERLOADED' });
    r2.release();
    r2.release();
    expect(refusal()).toBeUndefined();
    const r3 = b.reserve();
    const w3 = b.acquire(1, 'reserved 3', undefined, r3);
    expect(b.state).toMatchObject({ running: 1, waiting: 2 });
    expect(refusal()).toMatchObject({ code: 'ERR_OVERLOADED', message: expect.stringContaining('2 jobs are already waiting for memory and 0 reading') });
    await expect(b.acquire(1, 'third in line')).rejects.toMatchObject({ code: 'ERR_OVERLOADED' });
    held.release();
    (await w1).release();
    (await w3).release();
    expect(b.state).toMatchObject({ running: 0, waiting: 0, admittedBytes: 0 });
    expect(refusal()).toBeUndefined();
  });

  it('reserve: while jobs can start at once as many may read side by side as can run and wait (a slow origin\'s reads overlap); the next is refused unread; refused places come back', async () => {
    const b = budget({ maxRunning: 2, maxWaiting: 1 });
    // Idle: two to run and one to wait may read at once; a fourth would only be refused after its read.
    const places = [0, 1, 2].map(() => b.reserve());
    expect(() => b.reserve()).toThrow(expect.objectContaining({ code: 'ERR_OVERLOADED', message: expect.stringContaining('3 reading their sources') }));
    const asked = places.map((p, i) => b.acquire(1, `job ${i}`, undefined, p).then((l) => l, (e: unknown) => e));
    expect(b.state).toMatchObject({ running: 2, waiting: 1 });
    // Every place is taken: with two running and one waiting, the next is refused unread.
    expect(() => b.reserve()).toThrow(expect.objectContaining({ code: 'ERR_OVERLOADED' }));
    // A reserved job refused for its size gives its place back too.
    const leases = (await Promise.all(asked.slice(0, 2))) as Array<{ release(): void }>;
    leases[0].release();
    const third = (await asked[2]) as { release(): void };
    const r = b.reserve();
    expect(() => b.reserve()).toThrow(expect.objectContaining({ code: 'ERR_OVERLOADED' }));
    await expect(b.acquire(150 * MiB, 'too big', undefined, r)).rejects.toMatchObject({ code: 'ERR_SOURCE_TOO_COSTLY' });
    b.reserve().release();
    leases[1].release();
    third.release();
    expect(b.state).toMatchObject({ running: 0, waiting: 0, admittedBytes: 0 });
  });

  it('an aborted waiter leaves the line with its signal reason, and the jobs behind it move up', async () => {
    const b = budget();
    const held = await b.acquire(95 * MiB, 'held');
    const gone = new AbortController();
    const first = b.acquire(50 * MiB, 'gone', gone.signal).catch((x: unknown) => x);
    const next = b.acquire(5 * MiB, 'next');
    gone.abort(new FoldwiseError('ERR_REQUEST_ABANDONED'));
    expect(((await first) as FoldwiseError).code).toBe('ERR_REQUEST_ABANDONED');
    // With the large job gone from the head, the small one fits beside the held one.
    const l = await next;
    expect(b.state).toMatchObject({ admittedBytes: 100 * MiB, waiting: 0 });
    l.release();
    held.release();
    expect(b.state.admittedBytes).toBe(0);
  });
});

describe('MemoryBudget.enter: the lobby', () => {
  /** Whether the promise has settled by now (after pending microtasks). */
  const settled = async (p: Promise<unknown>) => {
    let done = false;
    p.then(() => (done = true), () => (done = true));
    await new Promise((r) => setImmediate(r));
    return done;
  };

  it('past a full line a request waits, unread, for a place, in arrival order; the place its leader frees by acquiring is not given away', async () => {
    const b = budget({ maxRunning: 1, maxWaiting: 1, maxLobby: 2 });
    const running = await b.acquire(1, 'running');
    const place = await b.enter(); // the line's one place
    const guests = [b.enter(), b.enter()];
    expect(b.state.lobby).toBe(2);
    // The reserved job takes its place in line: the place stays taken, no guest is seated.
    const waiting = b.acquire(1, 'reserved', undefined, place);
    expect(b.state).toMatchObject({ running: 1, waiting: 1, lobby: 2 });
    expect(await settled(guests[0])).toBe(false);
    // A third guest finds the lobby full: refused at once.
    await expect(b.enter()).rejects.toMatchObject({ code: 'ERR_OVERLOADED', message: expect.stringContaining('2 waiting for a place') });
    // The running job ends: the waiting one runs, the line's place frees, the first guest takes it.
    running.release();
    const second = await waiting;
    const seated = await guests[0];
    expect(b.state).toMatchObject({ running: 1, waiting: 0, lobby: 1 });
    expect(await settled(guests[1])).toBe(false);
    // A seated guest that gives its place back (its read failed) seats the next.
    seated.release();
    const last = await guests[1];
    expect(b.state.lobby).toBe(0);
    last.release();
    second.release();
    expect(b.state).toMatchObject({ running: 0, waiting: 0, lobby: 0, admittedBytes: 0 });
  });

  it('a guest not seated within maxWaitMs gets 503 ERR_OVERLOADED; one whose signal aborts leaves with its reason', async () => {
    const b = budget({ maxRunning: 1, maxWaiting: 0, maxLobby: 4, maxWaitMs: 5 });
    const running = await b.acquire(1, 'running');
    const late = (await b.enter().catch((x: unknown) => x)) as FoldwiseError;
    expect([late.code, late.headers]).toEqual(['ERR_OVERLOADED', { 'retry-after': '3' }]);
    expect(late.message).toContain('no place in the wait line within 5 ms');
    const gone = new AbortController();
    const leaving = b.enter(gone.signal).catch((x: unknown) => x);
    expect(b.state.lobby).toBe(1);
    gone.abort(new FoldwiseError('ERR_REQUEST_ABANDONED'));
    expect(((await leaving) as FoldwiseError).code).toBe('ERR_REQUEST_ABANDONED');
    expect(b.state.lobby).toBe(0);
    running.release();
  });

  it('with no lobby (maxLobby 0) enter refuses at once as reserve does; while jobs can start it reserves at once', async () => {
    const b = budget({ maxRunning: 1, maxWaiting: 0 });
    const first = await b.enter();
    const running = await b.acquire(1, 'running', undefined, first);
    await expect(b.enter()).rejects.toMatchObject({ code: 'ERR_OVERLOADED' });
    expect(() => b.reserve()).toThrow(expect.objectContaining({ code: 'ERR_OVERLOADED' }));
    running.release();
    (await b.enter()).release();
    expect(b.state).toMatchObject({ running: 0, lobby: 0 });
  });
});

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

  it('reserve: while jobs can start at once any number may read (a slow origin\'s reads overlap); admission then decides as before and gives refused places back', async () => {
    const b = budget({ maxRunning: 2, maxWaiting: 1 });
    const places = [0, 1, 2, 3, 4].map(() => b.reserve());
    const asked = places.map((p, i) => b.acquire(1, `job ${i}`, undefined, p).then((l) => l, (e: unknown) => e));
    expect(b.state).toMatchObject({ running: 2, waiting: 1 });
    const refused = await Promise.all(asked.slice(3));
    expect(refused.map((e) => (e as FoldwiseError).code)).toEqual(['ERR_OVERLOADED', 'ERR_OVERLOADED']);
    // Every place was taken or given back: with two running and one waiting, the next is refused unread.
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

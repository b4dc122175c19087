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

  it('refuseIfFull throws the 503 acquire would throw exactly when the wait line is full, and nothing before', async () => {
    const b = budget({ maxRunning: 1, maxWaiting: 2 });
    expect(() => b.refuseIfFull()).not.toThrow();
    const held = await b.acquire(1, 'running');
    expect(() => b.refuseIfFull()).not.toThrow();
    const w1 = b.acquire(1, 'waits 1');
    expect(() => b.refuseIfFull()).not.toThrow();
    const w2 = b.acquire(1, 'waits 2');
    let thrown: unknown;
    try {
      b.refuseIfFull();
    } catch (e) {
      thrown = e;
    }
    expect(thrown).toMatchObject({ code: 'ERR_OVERLOADED', status: 503, headers: { 'retry-after': '3' } });
    // acquire refuses the same job the same way.
    await expect(b.acquire(1, 'third')).rejects.toMatchObject({ code: 'ERR_OVERLOADED' });
    held.release();
    (await w1).release();
    expect(() => b.refuseIfFull()).not.toThrow();
    (await w2).release();
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

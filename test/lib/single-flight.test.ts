import { describe, expect, it } from 'vitest';
import { SingleFlight } from '../../src/lib/single-flight.js';

/** A promise plus its resolve/reject, so the test decides when work finishes. */
function gate<T>() {
  let resolve!: (v: T) => void;
  let reject!: (e: unknown) => void;
  const promise = new Promise<T>((res, rej) => ((resolve = res), (reject = rej)));
  return { promise, resolve, reject };
}

describe('SingleFlight', () => {
  it('runs concurrent identical work once and shares the result', async () => {
    const joined = gate<void>();
    const flight = new SingleFlight((_k, waiters) => waiters === 4 && joined.resolve());
    const work = gate<string>();
    let runs = 0;
    const calls = Array.from({ length: 5 }, () =>
      flight.run('k', () => {
        runs += 1;
        return work.promise;
      }),
    );
    await joined.promise; // all four followers have joined the leader's flight
    work.resolve('done');
    const results = await Promise.all(calls);
    expect(runs).toBe(1);
    expect(results.map((r) => r.value)).toEqual(['done', 'done', 'done', 'done', 'done']);
    expect(results.filter((r) => r.leader)).toHaveLength(1);
    expect(flight.size).toBe(0);
  });

  it('shares a failure, then forgets it', async () => {
    const flight = new SingleFlight();
    const work = gate<string>();
    const a = flight.run('k', () => work.promise);
    const b = flight.run('k', () => Promise.resolve('other'));
    work.reject(new Error('boom'));
    await expect(a).rejects.toThrow('boom');
    await expect(b).rejects.toThrow('boom');
    await expect(flight.run('k', async () => 'again')).resolves.toEqual({ value: 'again', leader: true });
  });

  it('keeps different keys apart', async () => {
    const flight = new SingleFlight();
    const [x, y] = await Promise.all([flight.run('x', async () => 1), flight.run('y', async () => 2)]);
    expect([x.value, y.value]).toEqual([1, 2]);
    expect(x.leader && y.leader).toBe(true);
  });
});

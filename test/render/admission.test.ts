import { describe, expect, it } from 'vitest';
import { Admission } from '../../src/render/admission.js';
import { FoldwiseError } from '../../src/errors.js';

describe('Admission', () => {
  it('runs `permits` at once, queues `maxWaiting` in order, refuses the rest with ERR_OVERLOADED', async () => {
    const a = new Admission(2, 2, 3);
    const r1 = await a.admit();
    const r2 = await a.admit();
    const order: number[] = [];
    const w3 = a.admit().then((r) => (order.push(3), r));
    const w4 = a.admit().then((r) => (order.push(4), r));
    expect([a.inFlight, a.waiting, a.bound]).toEqual([4, 2, 4]);
    const refused = await a.admit().catch((e: unknown) => e);
    expect(refused).toBeInstanceOf(FoldwiseError);
    expect((refused as FoldwiseError).code).toBe('ERR_OVERLOADED');
    expect((refused as FoldwiseError).headers).toEqual({ 'retry-after': '3' });
    r1();
    const r3 = await w3;
    expect(order).toEqual([3]); // first in, first served
    r2();
    const r4 = await w4;
    expect(order).toEqual([3, 4]);
    r3();
    r4();
    expect(a.inFlight).toBe(0);
  });

  it('ignores a second release of the same permit', async () => {
    const a = new Admission(1, 0, 1);
    const r = await a.admit();
    r();
    r();
    expect(a.inFlight).toBe(0);
    const again = await a.admit();
    await expect(a.admit()).rejects.toMatchObject({ code: 'ERR_OVERLOADED' });
    again();
  });

  it('refuses nonsense bounds', () => {
    expect(() => new Admission(0, 1, 1)).toThrow(RangeError);
    expect(() => new Admission(1, -1, 1)).toThrow(RangeError);
    expect(() => new Admission(Number.NaN, 1, 1)).toThrow(RangeError);
  });
});

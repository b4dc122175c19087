import { describe, expect, it } from 'vitest';
import { BreakerOpenError, CallTimeoutError, CircuitBreaker, type BreakerState } from '../../src/cache/breaker.js';

function setup(threshold = 3) {
  let t = 0;
  const changes: Array<[BreakerState, BreakerState]> = [];
  const breaker = new CircuitBreaker('dep', { failureThreshold: threshold, openMs: 1_000, timeoutMs: 20, now: () => t });
  breaker.onChange((to, from) => changes.push([from, to]));
  return { breaker, changes, advance: (ms: number) => (t += ms) };
}
const fail = () => Promise.reject(new Error('down'));
const ok = () => Promise.resolve('ok');

describe('CircuitBreaker', () => {
  it('opens after N consecutive failures and then fails fast without calling', async () => {
    const { breaker, changes } = setup(3);
    for (let i = 0; i < 3; i++) await expect(breaker.run(fail)).rejects.toThrow('down');
    expect(breaker.state).toBe('open');
    let called = false;
    await expect(breaker.run(async () => { called = true; })).rejects.toBeInstanceOf(BreakerOpenError);
    expect(called).toBe(false);
    expect(changes).toEqual([['closed', 'open']]);
  });

  it('a success in between resets the failure count', async () => {
    const { breaker } = setup(2);
    await expect(breaker.run(fail)).rejects.toThrow();
    await breaker.run(ok);
    await expect(breaker.run(fail)).rejects.toThrow();
    expect(breaker.state).toBe('closed');
  });

  it('counts a call that never answers as a failure (timeout)', async () => {
    const { breaker } = setup(1);
    await expect(breaker.run(() => new Promise(() => {}))).rejects.toBeInstanceOf(CallTimeoutError);
    expect(breaker.state).toBe('open');
  });

  it('half-open lets exactly one probe through; success closes', async () => {
    const { breaker, changes, advance } = setup(1);
    await expect(breaker.run(fail)).rejects.toThrow();
    advance(1_000);
    expect(breaker.state).toBe('half-open');
    let release!: () => void;
    const probe = breaker.run(() => new Promise<void>((r) => (release = r)));
    await expect(breaker.run(ok)).rejects.toBeInstanceOf(BreakerOpenError);
    release();
    await probe;
    expect(breaker.state).toBe('closed');
    expect(changes).toEqual([['closed', 'open'], ['open', 'half-open'], ['half-open', 'closed']]);
  });

  it('a failed probe re-opens it for another full wait', async () => {
    const { breaker, advance } = setup(1);
    await expect(breaker.run(fail)).rejects.toThrow();
    advance(1_000);
    await expect(breaker.run(fail)).rejects.toThrow('down');
    expect(breaker.state).toBe('open');
    advance(999);
    expect(breaker.state).toBe('open');
    advance(1);
    expect(breaker.state).toBe('half-open');
  });

  it('a throwing listener does not change its behaviour', async () => {
    const { breaker } = setup(1);
    breaker.onChange(() => { throw new Error('logger broke'); });
    await expect(breaker.run(fail)).rejects.toThrow('down');
    expect(breaker.state).toBe('open');
  });

  it('rejects nonsense options, NaN included', () => {
    expect(() => new CircuitBreaker('x', { failureThreshold: NaN, openMs: 1, timeoutMs: 1 })).toThrow(RangeError);
    expect(() => new CircuitBreaker('x', { failureThreshold: 1, openMs: 1, timeoutMs: 0 })).toThrow(RangeError);
  });
});

import { describe, expect, it } from 'vitest';
import { JobTable } from '../../src/ingest/jobs.js';
import { OnceByKey } from '../../src/ingest/single-flight.js';

const describeError = (e: unknown) => ({ code: 'ERR_TEST', detail: String((e as Error).message) });

function gate() {
  let open!: () => void;
  const opened = new Promise<void>((resolve) => (open = resolve));
  return { open, opened };
}

describe('JobTable', () => {
  it('runs a job to done and to failed, signalling by event', async () => {
    const table = new JobTable<number>(4);
    const g = gate();
    const ok = table.start(async () => {
      await g.opened;
      return 42;
    }, describeError)!;
    expect(ok.state).toBe('queued');
    const bad = table.start(async () => {
      throw new Error('nope');
    }, describeError)!;
    g.open();
    expect(await table.settled(ok.id)).toMatchObject({ state: 'done', result: 42 });
    expect(await table.settled(bad.id)).toMatchObject({ state: 'failed', error: { code: 'ERR_TEST', detail: 'nope' } });
  });

  it('stays bounded: evicts finished jobs, refuses when all are unfinished', async () => {
    const table = new JobTable<number>(2);
    const g = gate();
    const a = table.start(async () => 1, describeError)!;
    await table.settled(a.id);
    const b = table.start(() => g.opened.then(() => 2), describeError)!;
    const c = table.start(() => g.opened.then(() => 3), describeError)!;
    expect(table.get(a.id)).toBeUndefined();
    expect(table.size).toBe(2);
    expect(table.start(async () => 4, describeError)).toBeUndefined();
    g.open();
    await Promise.all([table.settled(b.id), table.settled(c.id)]);
    expect(table.start(async () => 5, describeError)).toBeDefined();
  });
});

describe('OnceByKey', () => {
  it('computes once for concurrent and repeated calls, and retries after a failure', async () => {
    const once = new OnceByKey<{ n: number }>(8);
    let calls = 0;
    const g = gate();
    const first = once.run('k', async () => {
      calls++;
      await g.opened;
      return { n: calls };
    });
    const second = once.run('k', async () => ({ n: -1 }));
    expect([first.reused, second.reused]).toEqual([false, true]);
    g.open();
    expect(await second.value).toEqual({ n: 1 });
    expect(once.run('k', async () => ({ n: -1 })).reused).toBe(true);
    expect(calls).toBe(1);

    const failing = once.run('f', async () => {
      throw new Error('x');
    });
    await expect(failing.value).rejects.toThrow('x');
    expect(once.run('f', async () => ({ n: 7 })).reused).toBe(false);
  });
});

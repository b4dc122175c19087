import { describe, expect, it } from 'vitest';
import { JobTable } from '../../src/ingest/jobs.js';
import { OnceByKey } from '../../src/lib/once-by-key.js';

const describeError = (e: unknown) => ({ code: 'ERR_TEST', detail: String((e as Error).message) });

function gate() {
  let open!: () => void;
  const opened = new Promise<void>((resolve) => (open = resolve));
  return { open, opened };
}

describe('JobTable', () => {
  it('runs a job to done and to failed, signalling by event', async () => {
    const table = new JobTable<number>(4);
    const slot = gate();
    const g = gate();
    let markedStarted!: () => void;
    const ok = table.start(async (started) => {
      await slot.opened;
      started();
      markedStarted();
      await g.opened;
      return 42;
    }, describeError)!;
    expect(ok.state).toBe('queued');
    await new Promise<void>((resolve) => {
      markedStarted = resolve;
      slot.open();
    });
    expect(table.get(ok.id)?.state).toBe('running');
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
    expect(table.start(async () => 5, describeError)?.state).toBe('queued');
  });
});

describe('Gate', () => {
  it('lets at most `limit` calls in, the rest in arrival order', async () => {
    const { Gate } = await import('../../src/lib/semaphore.js');
    const g = new Gate(2);
    const gates = [gate(), gate(), gate()];
    const order: number[] = [];
    let inside = 0;
    let most = 0;
    const runs = gates.map((x, i) =>
      g.run(async () => {
        inside++;
        most = Math.max(most, inside);
        order.push(i);
        await x.opened;
        inside--;
      }),
    );
    await Promise.resolve();
    expect(order).toEqual([0, 1]);
    gates[1].open();
    await runs[1];
    gates[0].open();
    gates[2].open();
    await Promise.all(runs);
    expect(order).toEqual([0, 1, 2]);
    expect(most).toBe(2);
  });

  it('refuses at once past `maxWaiting` waiters, and admits again once the line shortens', async () => {
    const { Gate } = await import('../../src/lib/semaphore.js');
    const g = new Gate(1, 1, () => new Error('full'));
    const first = gate();
    const second = gate();
    const runs = [g.run(() => first.opened), g.run(() => second.opened)];
    await expect(g.run(async () => 'third')).rejects.toThrow('full');
    first.open();
    await runs[0];
    // The waiter moved inside: the line is empty again, so one more may wait.
    const fourth = g.run(async () => 'fourth');
    second.open();
    await expect(fourth).resolves.toBe('fourth');
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

import { readdirSync, readFileSync } from 'node:fs';
import { getPriority } from 'node:os';
import { afterEach, describe, expect, it } from 'vitest';
import { resolveConfig } from '../../src/config.js';
import { threadTid } from '../../src/pool/nice.js';
import { RenderPool } from '../../src/pool/render-pool.js';

// proc(5): field 19 of /proc/<pid>/task/<tid>/stat is the thread's nice value (-20..19), and
// setpriority(2) on a thread id sets that thread's alone (Linux; POSIX would say the process).
const linux = process.platform === 'linux';

/** The nice value of each of this process's threads, by thread id. */
function threadNices(): Map<number, number> {
  const out = new Map<number, number>();
  for (const tid of readdirSync('/proc/self/task')) {
    const stat = readFileSync(`/proc/self/task/${tid}/stat`, 'latin1');
    // comm (field 2) may hold spaces: the fields after it start past its closing parenthesis.
    const fields = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
    out.set(Number(tid), Number(fields[16]));
  }
  return out;
}

describe.runIf(linux)('pool.threadNice: the worker threads yield, the rest of the process does not', () => {
  let pool: RenderPool | undefined;
  afterEach(async () => {
    await pool?.close();
    pool = undefined;
  });

  it('each worker thread takes the nice value; the event loop keeps its own', async () => {
    const own = getPriority(threadTid()!);
    const before = [...threadNices().values()].filter((n) => n === 13).length;
    pool = new RenderPool({ threads: 2, maxQueue: null, retryAfterSeconds: 1, threadNice: 13 });
    await pool.warm();
    const after = [...threadNices().values()].filter((n) => n === 13).length;
    expect(after - before).toBe(2);
    expect(getPriority(threadTid()!)).toBe(own);
  });

  it('0 leaves the threads at the process\'s value', async () => {
    const own = getPriority(threadTid()!);
    // Threads whose nice is not the event loop's: none of the new pool's may be among them.
    const lowered = () => [...threadNices().values()].filter((n) => n !== own).length;
    const before = lowered();
    const threadsBefore = threadNices().size;
    pool = new RenderPool({ threads: 2, maxQueue: null, retryAfterSeconds: 1, threadNice: 0 });
    await pool.warm();
    expect(threadNices().size).toBeGreaterThanOrEqual(threadsBefore + 2);
    expect(lowered()).toBe(before);
  });
});

describe('pool.threadNice in the configuration', () => {
  it('defaults to 0 (off) and refuses values outside 0..19', () => {
    expect(resolveConfig().pool.threadNice).toBe(0);
    expect(resolveConfig({ pool: { threadNice: 10 } }).pool.threadNice).toBe(10);
    expect(() => resolveConfig({ pool: { threadNice: 20 } })).toThrow(/threadNice/);
    expect(() => resolveConfig({ pool: { threadNice: -1 } })).toThrow(/threadNice/);
  });
});

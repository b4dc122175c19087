import { describe, expect, it } from 'vitest';
import { liveSpool } from '../../../src/pool/spool/live.js';
import { STOPPED, WRITING, WRITTEN } from '../../../src/pool/spool/rows.js';

const shape = { width: 4, height: 3, channels: 3 as const, depth: 8 as const };
const stateOf = (l: ReturnType<typeof liveSpool>) => Atomics.load(new Int32Array(l.raster.state), 0);

describe('liveSpool: a spool file whose readers follow the decode', () => {
  it('is WRITING until the decode ends, then WRITTEN; a later stop still ends the readers', async () => {
    let done!: () => void;
    const l = liveSpool('/nowhere/a.v', shape, new Promise<void>((r) => (done = r)));
    expect(l.raster).toMatchObject({ path: '/nowhere/a.v', width: 4, height: 3, channels: 3, depth: 8 });
    expect(stateOf(l)).toBe(WRITING);
    done();
    await Promise.resolve();
    await Promise.resolve();
    expect(stateOf(l)).toBe(WRITTEN);
    l.stop();
    expect(stateOf(l)).toBe(STOPPED);
  });

  it('a failed decode stops the readers, and so does stop() before the decode ends (it stays stopped)', async () => {
    const failed = liveSpool('/nowhere/b.v', shape, Promise.reject(new Error('corrupt')));
    await new Promise((r) => setImmediate(r));
    expect(stateOf(failed)).toBe(STOPPED);
    let done!: () => void;
    const stopped = liveSpool('/nowhere/c.v', shape, new Promise<void>((r) => (done = r)));
    stopped.stop();
    done();
    await new Promise((r) => setImmediate(r));
    expect(stateOf(stopped)).toBe(STOPPED);
  });
});

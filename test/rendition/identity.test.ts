import { describe, expect, it } from 'vitest';
import type { Origin, SourceIdentity } from '../../src/origins/types.js';
import { IdentityMemo } from '../../src/rendition/identity.js';

/** An origin whose identities the test sets, counting identify calls. */
function countingOrigin() {
  const versions = new Map<string, string>();
  const state = { calls: 0 };
  const origin: Origin = {
    name: 'counting',
    async identify(path): Promise<SourceIdentity> {
      state.calls += 1;
      const version = versions.get(path);
      if (!version) throw new Error(`no ${path}`);
      return { key: path, version };
    },
    read: () => Promise.reject(new Error('not used')),
  };
  return { origin, versions, state };
}

describe('IdentityMemo', () => {
  it('asks the origin once within the TTL, again after it (fake clock, no waiting)', async () => {
    const o = countingOrigin();
    let now = 1000;
    const memo = new IdentityMemo(o.origin, 500, 100, () => now);
    o.versions.set('a.png', 'v1');
    expect((await memo.identify('a.png')).version).toBe('v1');
    o.versions.set('a.png', 'v2');
    now += 499;
    expect((await memo.identify('a.png')).version).toBe('v1');
    expect(o.state.calls).toBe(1);
    now += 2;
    expect((await memo.identify('a.png')).version).toBe('v2');
    expect(o.state.calls).toBe(2);
  });

  it('never remembers a failure', async () => {
    const o = countingOrigin();
    const memo = new IdentityMemo(o.origin, 60_000);
    await expect(memo.identify('late.png')).rejects.toThrow();
    o.versions.set('late.png', 'v1');
    expect((await memo.identify('late.png')).version).toBe('v1');
  });

  it('shares one origin call among concurrent look-ups', async () => {
    const o = countingOrigin();
    o.versions.set('b.png', 'v1');
    const memo = new IdentityMemo(o.origin, 60_000);
    await Promise.all([memo.identify('b.png'), memo.identify('b.png'), memo.identify('b.png')]);
    expect(o.state.calls).toBe(1);
  });

  it('with TTL 0 asks every time; forget() drops a memo', async () => {
    const o = countingOrigin();
    o.versions.set('c.png', 'v1');
    const none = new IdentityMemo(o.origin, 0);
    await none.identify('c.png');
    await none.identify('c.png');
    expect(o.state.calls).toBe(2);
    const memo = new IdentityMemo(o.origin, 60_000);
    await memo.identify('c.png');
    memo.forget('c.png');
    await memo.identify('c.png');
    expect(o.state.calls).toBe(4);
  });
});

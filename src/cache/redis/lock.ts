import { randomUUID } from 'node:crypto';
import { EventEmitter } from 'node:events';
import type { RedisLink } from './link.js';
import { KeyChannels } from './wake.js';
import type { CacheEntry } from '../types.js';

export interface FlightOptions {
  /** Lifetime of a lock; the holder renews it every third of this while it works. */
  lockTtlMs: number;
  /** How long a waiter waits for another replica before rendering itself. */
  waitDeadlineMs: number;
  /** Polling interval, the fallback when a pub/sub message is missed. */
  pollMs?: number;
}

/** How this replica got the entry: it held the lock, waited for another, or went alone. */
export type FlightRole = 'leader' | 'follower' | 'solo';

export interface FlightWork {
  /** Reads the shared tier (where the holder's result is stored). */
  lookup(): Promise<CacheEntry | undefined>;
  /**
   * Renders the entry and stores it where `lookup` reads, before it resolves: the holder wakes
   * the waiters once it has. The store is the caller's own, its one write path (renderRendition
   * writes every tier), so nothing here stores a second time.
   */
  produce(): Promise<CacheEntry>;
}

type WaitOutcome = CacheEntry | 'released' | 'deadline' | 'unavailable';

// Compare-and-delete / compare-and-renew: only the token's owner may touch its lock.
const RELEASE = "if redis.call('get', KEYS[1]) == ARGV[1] then return redis.call('del', KEYS[1]) end return 0";
const RENEW = "if redis.call('get', KEYS[1]) == ARGV[1] then return redis.call('pexpire', KEYS[1], ARGV[2]) end return 0";

/**
 * Single-flight across replicas. The first replica to miss takes `SET lock token NX PX ttl`
 * and renders; the others wait for its result, woken by a message on the key's channel or,
 * failing that, by polling, until a deadline. A lock that vanishes without a result (the
 * holder died or failed) is taken by one waiter, which renders. With Redis unavailable every
 * replica renders on its own ('solo'). Emits 'leader', 'wait' and 'solo' with the key.
 */
export class RedisFlight extends EventEmitter {
  private readonly channels: KeyChannels;
  private readonly pollMs: number;

  constructor(
    private readonly link: RedisLink,
    private readonly options: FlightOptions,
  ) {
    super();
    if (!(options.lockTtlMs >= 10) || !(options.waitDeadlineMs >= 0)) {
      throw new RangeError('flight: lockTtlMs >= 10 and waitDeadlineMs >= 0');
    }
    this.channels = new KeyChannels(link);
    this.pollMs = options.pollMs ?? Math.max(25, Math.min(250, options.lockTtlMs / 4));
  }

  async run(key: string, work: FlightWork): Promise<{ entry: CacheEntry; role: FlightRole }> {
    const deadline = Date.now() + this.options.waitDeadlineMs;
    const lockKey = `${this.link.namespace}lock:${key}`;
    const token = randomUUID();
    for (;;) {
      const taken = await this.link
        .call((c) => c.set(lockKey, token, 'PX', this.options.lockTtlMs, 'NX'))
        .then((r) => r === 'OK', () => undefined);
      if (taken === undefined) return this.solo(key, work);
      if (taken) {
        // Another replica may have stored it between our cache miss and taking the lock.
        const stored = await work.lookup().catch(() => undefined);
        if (stored) {
          await this.release(lockKey, token);
          return { entry: stored, role: 'follower' };
        }
        this.emit('leader', key);
        return { entry: await this.lead(key, lockKey, token, work), role: 'leader' };
      }
      const outcome = await this.wait(key, lockKey, work, deadline);
      if (typeof outcome === 'object') return { entry: outcome, role: 'follower' };
      if (outcome !== 'released') return this.solo(key, work);
      // The lock is gone and no result came: try to take it and render here.
    }
  }

  private async solo(key: string, work: FlightWork): Promise<{ entry: CacheEntry; role: FlightRole }> {
    this.emit('solo', key);
    return { entry: await work.produce(), role: 'solo' };
  }

  private async lead(key: string, lockKey: string, token: string, work: FlightWork): Promise<CacheEntry> {
    const ttl = this.options.lockTtlMs;
    const renew = setInterval(() => {
      this.link.call((c) => c.eval(RENEW, 1, lockKey, token, ttl)).catch(() => {});
    }, Math.max(5, Math.floor(ttl / 3)));
    renew.unref();
    let message = 'fail';
    try {
      const entry = await work.produce();
      message = 'done';
      return entry;
    } finally {
      clearInterval(renew);
      const channel = this.channels.channel(key);
      await this.release(lockKey, token);
      await this.link.call((c) => c.publish(channel, message)).catch(() => {});
    }
  }

  private async release(lockKey: string, token: string): Promise<void> {
    await this.link.call((c) => c.eval(RELEASE, 1, lockKey, token)).catch(() => {});
  }

  private wait(key: string, lockKey: string, work: FlightWork, deadline: number): Promise<WaitOutcome> {
    return new Promise<WaitOutcome>((resolve) => {
      let settled = false;
      let running = false;
      let again = false;
      const finish = (outcome: WaitOutcome): void => {
        if (settled) return;
        settled = true;
        clearInterval(poll);
        clearTimeout(limit);
        this.channels.unlisten(key, check);
        resolve(outcome);
      };
      const probe = async (): Promise<WaitOutcome | undefined> => {
        const entry = await work.lookup().catch(() => undefined);
        if (entry) return entry;
        const held = await this.link.call((c) => c.exists(lockKey)).catch(() => undefined);
        if (held === undefined) return this.link.breaker.state === 'closed' ? undefined : 'unavailable';
        if (held > 0) return undefined;
        // Released: the holder stores before it releases, so read once more.
        return (await work.lookup().catch(() => undefined)) ?? 'released';
      };
      function check(): void {
        if (settled) return;
        if (running) {
          again = true;
          return;
        }
        running = true;
        void probe().then((outcome) => {
          running = false;
          if (outcome) finish(outcome);
          else if (again) {
            again = false;
            check();
          }
        });
      }
      const poll = setInterval(check, this.pollMs);
      const limit = setTimeout(() => finish('deadline'), Math.max(0, deadline - Date.now()));
      // Check only once subscribed: a result published before that is found by the check.
      void this.channels.listen(key, check).then(() => {
        if (settled) return;
        this.emit('wait', key);
        check();
      });
    });
  }
}

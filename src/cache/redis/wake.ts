import type { RedisLink } from './link.js';

/**
 * Wake-up calls by pub/sub: one channel per key (`<namespace>done:<key>`), subscribed while
 * at least one waiter listens on it, on the link's subscriber connection.
 */
export class KeyChannels {
  private readonly waiters = new Map<string, { wakers: Set<() => void>; subscribed: Promise<void> }>();
  private listening = false;
  private readonly prefix: string;

  constructor(private readonly link: RedisLink) {
    this.prefix = `${link.namespace}done:`;
  }

  /** The channel a key's result is announced on. */
  channel(key: string): string {
    return this.prefix + key;
  }

  /** Calls `wake` on every message for the key; resolves once subscribed (or once that failed). */
  listen(key: string, wake: () => void): Promise<void> {
    const sub = this.link.subscriber();
    if (!this.listening) {
      this.listening = true;
      sub.on('message', (channel: string) => {
        for (const w of this.waiters.get(channel.slice(this.prefix.length))?.wakers ?? []) w();
      });
    }
    let entry = this.waiters.get(key);
    if (!entry) {
      const subscribed = sub.subscribe(this.channel(key)).then(() => {}, () => {});
      entry = { wakers: new Set(), subscribed };
      this.waiters.set(key, entry);
    }
    entry.wakers.add(wake);
    return entry.subscribed;
  }

  /** Removes a waker; the channel is unsubscribed when its last waker leaves. */
  unlisten(key: string, wake: () => void): void {
    const entry = this.waiters.get(key);
    if (!entry) return;
    entry.wakers.delete(wake);
    if (entry.wakers.size > 0) return;
    this.waiters.delete(key);
    this.link.subscriber().unsubscribe(this.channel(key)).catch(() => {});
  }
}

/**
 * Deleting a source on every replica at once: the replica that deletes publishes the purge on
 * Redis (`<namespace>purge`); every other replica forgets the source's entries in its own
 * memory and disk tiers and memos, then acknowledges (`<namespace>purged`). The deleting
 * replica waits for as many acknowledgements as PUBLISH counted receivers, within a bound.
 * A replica that is not subscribed misses purges, so readiness asks `subscribed` (and the
 * bus says 'subscribed' each time the subscription is made, again after a lost connection).
 */
import { randomUUID } from 'node:crypto';
import { EventEmitter } from 'node:events';
import type { RedisLink } from './redis/link.js';

export type ForgetLocally = (source: string, keys: string[]) => Promise<void>;

interface PurgeMessage {
  id: string;
  from: string;
  source: string;
  keys: string[];
}

/** starting: no outcome yet; live: subscribed now; lost: the subscription failed or its connection dropped. */
export type PurgeState = 'starting' | 'live' | 'lost';

export class PurgeBus extends EventEmitter {
  private readonly me = randomUUID();
  private readonly acks = new EventEmitter();
  private readonly purge: string;
  private readonly purged: string;
  private pending: Promise<unknown> | undefined;
  private listening = false;
  private now: PurgeState = 'starting';

  constructor(
    private readonly link: RedisLink,
    private readonly forget: ForgetLocally,
    private readonly onError: (e: unknown) => void,
  ) {
    super();
    this.purge = `${link.namespace}purge`;
    this.purged = `${link.namespace}purged`;
  }

  /** Whether purges reach this replica now. */
  get state(): PurgeState {
    return this.now;
  }

  /** Resolves once subscribed (at once when it is now). */
  whenSubscribed(): Promise<void> {
    return this.now === 'live' ? Promise.resolve() : new Promise((resolve) => this.once('subscribed', () => resolve()));
  }

  private become(state: PurgeState): void {
    if (this.now === state) return;
    this.now = state;
    this.emit(state === 'live' ? 'subscribed' : state);
  }

  /** Subscribes (once); resolves when subscribed, or when that failed (it is retried on use). */
  start(): Promise<unknown> {
    if (this.pending) return this.pending;
    const sub = this.link.subscriber();
    if (!this.listening) {
      this.listening = true;
      // A subscription lost with the connection (or refused before it was up) is made again.
      sub.on('ready', () => {
        this.pending = undefined;
        void this.start();
      });
      sub.on('close', () => this.become('lost'));
      sub.on('message', (channel: string, text: string) => {
        if (channel === this.purge) void this.onPurge(text);
        else if (channel === this.purged) this.acks.emit('ack', text);
      });
    }
    this.pending = sub.subscribe(this.purge, this.purged).then(
      () => {
        if (sub.status === 'ready') this.become('live');
      },
      (e: unknown) => {
        this.pending = undefined;
        this.become('lost');
        this.onError(e);
      },
    );
    return this.pending;
  }

  private async onPurge(text: string): Promise<void> {
    let m: PurgeMessage;
    try {
      m = JSON.parse(text) as PurgeMessage;
    } catch {
      return;
    }
    if (m.from === this.me || typeof m.source !== 'string' || !Array.isArray(m.keys)) return;
    await this.forget(m.source, m.keys).catch(this.onError);
    await this.link.call((c) => c.publish(this.purged, m.id)).catch(this.onError);
  }

  /**
   * Tells the other replicas; resolves with how many there were and how many confirmed
   * within `timeoutMs`.
   */
  async broadcast(source: string, keys: string[], timeoutMs: number): Promise<{ replicas: number; confirmed: number }> {
    await this.start();
    const id = randomUUID();
    let confirmed = 0;
    let done!: () => void;
    const all = new Promise<void>((resolve) => (done = resolve));
    let expected = Number.POSITIVE_INFINITY;
    const onAck = (ackId: string) => {
      if (ackId === id && ++confirmed >= expected) done();
    };
    this.acks.on('ack', onAck);
    try {
      const message: PurgeMessage = { id, from: this.me, source, keys };
      // Receivers include this replica's own subscriber, which ignores its message.
      const receivers = await this.link.call((c) => c.publish(this.purge, JSON.stringify(message)));
      expected = Math.max(0, receivers - 1);
      if (confirmed >= expected) return { replicas: expected, confirmed };
      let timer: NodeJS.Timeout | undefined;
      await Promise.race([all, new Promise<void>((resolve) => (timer = setTimeout(resolve, timeoutMs)))]);
      clearTimeout(timer);
      return { replicas: expected, confirmed };
    } finally {
      this.acks.off('ack', onAck);
    }
  }
}

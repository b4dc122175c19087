import { Redis } from 'ioredis';
import { CircuitBreaker, withTimeout, type BreakerState } from '../breaker.js';

/** The part of a pino logger the link uses. */
export interface LinkLog {
  info(obj: object, msg: string): void;
  warn(obj: object, msg: string): void;
}

export interface RedisLinkOptions {
  /** redis://host:port/db */
  url: string;
  /** Bound on every command (client side and breaker). */
  commandTimeoutMs: number;
  /** Bound on establishing a connection. */
  connectTimeoutMs?: number;
  /** Prefix of every key and channel, so several services can share one Redis. */
  namespace?: string;
  /** Consecutive failures that open the breaker, and how long it stays open. */
  failureThreshold?: number;
  openMs?: number;
  log?: LinkLog;
}

export interface LinkHealth {
  status: 'up' | 'down';
  breaker: BreakerState;
}

const silent: LinkLog = { info: () => {}, warn: () => {} };

/**
 * One Redis connection (plus a lazily made subscriber connection) behind a circuit breaker.
 * The client connects lazily, never queues commands while offline (a call fails at once, so
 * requests fall back to rendering), bounds every command, and reconnects by itself.
 */
export class RedisLink {
  readonly client: Redis;
  readonly breaker: CircuitBreaker;
  readonly namespace: string;
  private sub: Redis | undefined;
  private closed = false;
  private readonly log: LinkLog;

  constructor(private readonly options: RedisLinkOptions) {
    this.log = options.log ?? silent;
    this.namespace = options.namespace ?? 'fw:';
    this.client = this.connection('main');
    this.breaker = new CircuitBreaker('redis', {
      failureThreshold: options.failureThreshold ?? 5,
      openMs: options.openMs ?? 2_000,
      // The breaker's bound sits just past the client's, so the client's error wins the race.
      timeoutMs: options.commandTimeoutMs + 50,
    });
    this.breaker.onChange((to, from, cause) => {
      const line = { breaker: 'redis', from, to, cause: cause instanceof Error ? cause.message : undefined };
      if (to === 'open') this.log.warn(line, 'shared cache circuit opened; serving from memory and rendering');
      else this.log.info(line, `shared cache circuit ${to}`);
    });
  }

  /** Starts connecting in the background; failures are handled by reconnects. */
  start(): void {
    if (this.client.status === 'wait') this.client.connect().catch(() => {});
  }

  /** Resolves once connected; rejects after `ms`. For start-up checks and tests. */
  ready(ms = 5_000): Promise<void> {
    this.start();
    if (this.client.status === 'ready') return Promise.resolve();
    const ready = new Promise<void>((resolve) => this.client.once('ready', () => resolve()));
    return withTimeout(ready, ms, 'redis connect');
  }

  /** Runs one Redis operation through the breaker (fails at once while it is open). */
  call<T>(fn: (client: Redis) => Promise<T>): Promise<T> {
    return this.breaker.run(() => fn(this.client));
  }

  /** A second connection for SUBSCRIBE (made on first use). */
  subscriber(): Redis {
    if (!this.sub) {
      this.sub = this.connection('sub');
      this.sub.connect().catch(() => {});
    }
    return this.sub;
  }

  health(): LinkHealth {
    return { status: this.client.status === 'ready' ? 'up' : 'down', breaker: this.breaker.state };
  }

  /** Quits politely within the command bound, then drops the sockets. Idempotent. */
  async close(): Promise<void> {
    if (this.closed) return;
    this.closed = true;
    await Promise.all(
      [this.client, this.sub].map(async (c) => {
        if (!c || c.status === 'end') return;
        const ended = new Promise<void>((resolve) => c.once('end', () => resolve()));
        if (c.status === 'ready') {
          await withTimeout(c.quit(), this.options.commandTimeoutMs, 'redis quit').catch(() => {});
        }
        c.disconnect(false);
        await withTimeout(ended, this.options.commandTimeoutMs, 'redis close').catch(() => {});
      }),
    );
  }

  private connection(role: 'main' | 'sub'): Redis {
    const client = new Redis(this.options.url, {
      lazyConnect: true,
      // Commands fail at once while offline; SUBSCRIBE may wait (bounded) for the connection.
      enableOfflineQueue: role === 'sub',
      maxRetriesPerRequest: 1,
      commandTimeout: this.options.commandTimeoutMs,
      connectTimeout: this.options.connectTimeoutMs ?? 2_000,
      // Reconnect forever, backing off to at most 2 s between attempts.
      retryStrategy: (times) => (this.closed ? null : Math.min(100 * times, 2_000)),
      connectionName: `foldwise-${role}`,
    });
    let reported = false;
    // Without a listener an 'error' event would throw; one line per outage is enough.
    client.on('error', (err: Error) => {
      if (reported || this.closed) return;
      reported = true;
      this.log.warn({ redis: role, err: err.message }, 'shared cache connection error');
    });
    // A dropped connection is an outage even when the reconnect succeeds before any error.
    client.on('close', () => {
      if (reported || this.closed) return;
      reported = true;
      this.log.warn({ redis: role }, 'shared cache connection lost');
    });
    client.on('ready', () => {
      if (reported) this.log.info({ redis: role }, 'shared cache connection restored');
      reported = false;
    });
    return client;
  }
}

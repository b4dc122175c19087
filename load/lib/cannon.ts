import autocannon from 'autocannon';

export interface CannonRun {
  /** Mean requests per second. */
  rps: number;
  p50: number;
  p99: number;
  completed: number;
  ok2xx: number;
  s503: number;
  s5xxOther: number;
  s4xx: number;
  errors: number;
}

export interface CannonOptions {
  url: string;
  connections: number;
  /** Seconds (bounded run); or use `amount`. */
  duration?: number;
  /** Total requests (bounded run). */
  amount?: number;
  /** Paths cycled through by each connection (default the URL's path). */
  paths?: string[];
  headers?: Record<string, string>;
  timeoutSeconds?: number;
}

/** One bounded autocannon run against a loopback URL; refuses anything that is not loopback. */
export async function cannon(o: CannonOptions): Promise<CannonRun> {
  const host = new URL(o.url).hostname;
  if (host !== '127.0.0.1' && host !== '[::1]') throw new Error(`load scripts only target loopback, not ${host}`);
  if (!o.duration && !o.amount) throw new Error('a load run needs a duration or an amount');
  const r = await autocannon({
    url: o.url,
    connections: o.connections,
    duration: o.duration,
    amount: o.amount,
    timeout: o.timeoutSeconds ?? 30,
    headers: o.headers,
    requests: o.paths?.map((path) => ({ method: 'GET' as const, path })),
  });
  const codes = r.statusCodeStats as unknown as Record<string, { count: number }>;
  const count = (code: string) => codes[code]?.count ?? 0;
  return {
    rps: r.requests.average,
    p50: r.latency.p50,
    p99: r.latency.p99,
    completed: r.requests.total,
    ok2xx: r['2xx'],
    s503: count('503'),
    s5xxOther: r['5xx'] - count('503'),
    s4xx: r['4xx'],
    errors: r.errors + r.timeouts,
  };
}

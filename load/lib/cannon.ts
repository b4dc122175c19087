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
  /** A fresh path for every request (overrides `paths`), e.g. to make each one a miss. */
  nextPath?: () => string;
  /** Called for every response with its status and latency in ms. */
  onResponse?: (status: number, ms: number) => void;
  headers?: Record<string, string>;
  timeoutSeconds?: number;
}

/** One bounded autocannon run against a loopback URL; refuses anything that is not loopback. */
export async function cannon(o: CannonOptions): Promise<CannonRun> {
  const host = new URL(o.url).hostname;
  if (host !== '127.0.0.1' && host !== '[::1]') throw new Error(`load scripts only target loopback, not ${host}`);
  if (!o.duration && !o.amount) throw new Error('a load run needs a duration or an amount');
  const requests = o.nextPath
    ? [{ method: 'GET' as const, setupRequest: (req: object) => ({ ...req, path: o.nextPath!() }) }]
    : o.paths?.map((path) => ({ method: 'GET' as const, path }));
  const r = await new Promise<autocannon.Result>((resolve, reject) => {
    const instance = autocannon(
      {
        url: o.url,
        connections: o.connections,
        // Only the bound that was given: autocannon rejects an explicit `duration: undefined`.
        ...(o.amount ? { amount: o.amount } : { duration: o.duration }),
        timeout: o.timeoutSeconds ?? 30,
        headers: o.headers,
        requests,
      },
      (err, result) => (err ? reject(err) : resolve(result)),
    );
    if (o.onResponse) {
      instance.on('response', (_client: unknown, status: number, _bytes: number, ms: number) => o.onResponse!(status, ms));
    }
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

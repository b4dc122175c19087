/**
 * Runs `work` over `items` with at most `limit` calls in flight, keeping the input order in
 * the result. The first failure stops new calls from starting and rejects once the calls
 * already running have settled (so nothing keeps working for a caller that has gone).
 */
export async function mapBounded<T, R>(items: readonly T[], limit: number, work: (item: T) => Promise<R>): Promise<R[]> {
  if (!(limit >= 1)) throw new RangeError(`limit must be >= 1, got ${limit}`);
  const out = new Array<R>(items.length);
  let next = 0;
  let failure: { error: unknown } | undefined;
  async function lane(): Promise<void> {
    while (!failure && next < items.length) {
      const i = next++;
      try {
        out[i] = await work(items[i]);
      } catch (error) {
        failure ??= { error };
      }
    }
  }
  await Promise.all(Array.from({ length: Math.min(limit, items.length) }, lane));
  if (failure) throw failure.error;
  return out;
}

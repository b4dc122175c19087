import { setFlagsFromString } from 'node:v8';
import { runInNewContext } from 'node:vm';

// A full collection before each reading, so garbage does not count as growth. The flag is
// set at run time because the test runner's workers are not started with --expose-gc.
setFlagsFromString('--expose-gc');
const gc = runInNewContext('gc') as () => void;

/** Resident set size and V8 heap in use, after two full garbage collections. */
export function settledMemory(): { rss: number; heap: number } {
  gc();
  gc();
  const m = process.memoryUsage();
  return { rss: m.rss, heap: m.heapUsed };
}

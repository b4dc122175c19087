import { setFlagsFromString } from 'node:v8';
import { runInNewContext } from 'node:vm';

/**
 * Sources bigger than this are not kept for reuse (src/pool/staging.ts); once their job
 * ends, the threads that saw them collect their garbage at once (handBack), so the memory
 * goes back to the system instead of waiting for a collection that an idle thread may never
 * run (three idle 512 MiB mappings were seen after four 8192x8192 16-bit uploads).
 */
export const HAND_BACK_MIN_BYTES = 64 * 2 ** 20;

// V8's full collection, without starting the process with --expose-gc (the flag only
// exposes the function to contexts made after it is set).
setFlagsFromString('--expose-gc');
const collect = runInNewContext('gc') as () => void;

let scheduled = false;

/**
 * Collects this thread's garbage once the current turn is over, so a large SharedArrayBuffer
 * or sharp Buffer no longer referenced is unmapped now. Several calls in one turn cost one
 * collection.
 */
export function handBack(): void {
  if (scheduled) return;
  scheduled = true;
  setImmediate(() => {
    scheduled = false;
    collect();
  });
}

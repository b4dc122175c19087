import { readFileSync } from 'node:fs';
import { totalmem } from 'node:os';

/** Share of the container's memory the render budget takes by default; the rest is the process itself, caches and slack. */
export const BUDGET_SHARE = 0.5;
/**
 * Most the default budget takes: with the process's own ~250 MiB (threads, caches) and the
 * estimates' slack it keeps the peak RSS plus spool under 1.5 GiB (the figures in the README).
 */
export const BUDGET_CAP_BYTES = 2 ** 30;

/** The cgroup v2 (else v1) memory limit, or null when there is none or it cannot be read. */
function cgroupLimit(): number | null {
  for (const file of ['/sys/fs/cgroup/memory.max', '/sys/fs/cgroup/memory/memory.limit_in_bytes']) {
    try {
      const v = Number(readFileSync(file, 'utf8').trim());
      // v1 says "no limit" with a huge number near 2^63.
      if (Number.isFinite(v) && v > 0 && v < 2 ** 60) return v;
    } catch {
      // Absent, or "max": no limit there.
    }
  }
  return null;
}

/** The setting as given, or BUDGET_SHARE of the container's limit (else the machine's memory), at most BUDGET_CAP_BYTES. */
export function resolveMemoryBudget(setting: number | null): number {
  if (setting !== null) return setting;
  const limit = Math.min(cgroupLimit() ?? Infinity, totalmem());
  return Math.floor(Math.min(limit * BUDGET_SHARE, BUDGET_CAP_BYTES));
}

import { AsyncLocalStorage } from 'node:async_hooks';
import { type Mark, tracing } from './trace.js';

const scope = new AsyncLocalStorage<Mark[]>();

/**
 * Runs `work` with `marks` collecting what note() is given inside it (the render's pool tasks
 * hand their threads' marks back with their outcomes); just runs it when not tracing.
 */
export function collectMarks<T>(marks: Mark[], work: () => T): T {
  return tracing ? scope.run(marks, work) : work();
}

/** Adds marks to the current render's timeline, if one is collected. */
export function note(...marks: Mark[]): void {
  if (tracing) scope.getStore()?.push(...marks);
}

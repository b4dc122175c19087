/**
 * A task module that kills the worker thread running it, loaded into the real render pool
 * by the fault tests in place of one resample task. `exit` ends the thread the way a fatal
 * error would; `throw-later` raises an exception nothing catches, outside the task's promise.
 */
export default function crash(task: { mode?: string }): Promise<number> {
  if (task.mode === 'throw-later') {
    setImmediate(() => {
      throw new Error('injected uncaught exception in a render worker');
    });
    return new Promise(() => undefined);
  }
  process.exit(70);
}

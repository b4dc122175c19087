import { readFileSync } from 'node:fs';

/** A process's children, as Linux lists them under /proc (empty once it has gone). */
function children(pid: number): number[] {
  try {
    return readFileSync(`/proc/${pid}/task/${pid}/children`, 'utf8').trim().split(/\s+/).filter(Boolean).map(Number);
  } catch {
    return [];
  }
}

/** A process's arguments, the program first (empty once it has gone). */
function argv(pid: number): string[] {
  try {
    return readFileSync(`/proc/${pid}/cmdline`, 'utf8').split('\0');
  } catch {
    return [];
  }
}

/**
 * The process under `root` (breadth first, `root` excluded) that runs the script `script`
 * (its second argument: `node script …`): the server that script(1) started, whether its shell
 * exec'd into it or stayed as its parent (a shell's own arguments hold the whole command as one
 * string, so it never matches). Throws when there is none, so a test never signals a process
 * it did not mean.
 */
export function server(root: number, script: string): number {
  const queue = children(root);
  while (queue.length > 0) {
    const pid = queue.shift() as number;
    if (argv(pid)[1] === script) return pid;
    queue.push(...children(pid));
  }
  throw new Error(`no process under ${root} runs ${script}`);
}

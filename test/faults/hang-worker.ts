/**
 * A task module that never finishes, loaded into the real render pool by the fault tests in
 * place of one resample task: only piscina's abort (which ends the thread) stops it.
 */
export default function hang(): Promise<number> {
  return new Promise<number>(() => undefined);
}

/** The pool's named tasks (the analysis of prefilter=auto, its decision) hang the same way. */
export const analyse = hang;
export const adapt = hang;

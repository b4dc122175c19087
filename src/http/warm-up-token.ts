import { randomUUID } from 'node:crypto';

/**
 * Marks the warm-up's own requests through the rendition route (warm-path.ts): a header whose
 * value is new in every process, so no client can send it. The metrics leave them out.
 */
export const warmUpHeader = 'foldwise-warm-up';
export const warmUpToken = randomUUID();

/**
 * The copies the inspector sets beside the foldwise one, as rendition parameters (no DOM, so
 * tests in Node can check them against the service's kernel table).
 *
 * The legacy look: what common resizers produce (encoded values averaged, Lanczos-3, nothing
 * removed first). Point sampling: one source pixel per output pixel, nothing averaged.
 */
export const legacyLook = { light: 'encoded', kernel: 'lanczos-3', prefilter: 'none' } as const;
export const pointSampling = { kernel: 'nearest-neighbour', prefilter: 'none' } as const;

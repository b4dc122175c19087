import { describe, expect, it } from 'vitest';
import { serverTiming } from '../../src/rendition/timings.js';

describe('serverTiming', () => {
  // Header syntax: W3C Server Timing, `name;desc="...";dur=ms`, entries joined by ", ".
  it('puts the cache outcome first, then each stage once with its summed duration, in order', () => {
    const header = serverTiming('miss', [
      { stage: 'origin', ms: 1.5 },
      { stage: 'cache', ms: 0.25 },
      { stage: 'decode', ms: 10 },
      { stage: 'resample', ms: 2 },
      { stage: 'resample', ms: 3.125 },
      { stage: 'cache', ms: 0.5 },
    ]);
    expect(header).toBe('cache;desc="miss";dur=0.75, origin;dur=1.50, decode;dur=10.00, resample;dur=5.13');
  });

  it('a hit with no cache timing still reports the cache entry', () => {
    expect(serverTiming('hit-memory', [{ stage: 'origin', ms: 0.01 }])).toBe('cache;desc="hit-memory";dur=0.00, origin;dur=0.01');
  });
});

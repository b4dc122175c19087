import { describe, expect, it } from 'vitest';
import { patternName, type Pattern } from '../../src/inspector/patterns.js';

function pattern(kind: Pattern['kind'], apparent: { fx: number; fy: number }): Pattern {
  return { kind, frequency: { fx: -0.3, fy: 0.1 }, apparent, cyclesPerDegree: 5, contrast: 0.05, threshold: 0.01, margin: 5, description: '' };
}

describe('pattern names, by what a pattern does in the copy', () => {
  it('calls a fold to a coarse frequency coarse bands, with their period in output px', () => {
    // Apparent 0.05 cycles per output px along x: one band every 1 / 0.05 = 20 output px.
    expect(patternName(pattern('fold', { fx: -0.05, fy: 0 }))).toBe('folds into coarse bands every 20.0 output px');
  });

  it('calls a fold to a fine frequency false fine stripes, and the broadband fold grain', () => {
    // Apparent 0.453 cycles per output px: stripes 2.2 px apart are not coarse bands.
    expect(patternName(pattern('fold', { fx: 0.453, fy: 0 }))).toBe('folds into false fine stripes every 2.2 output px');
    const grain = { ...pattern('fold', { fx: 0.453, fy: 0 }), source: 'broadband' as const };
    expect(patternName(grain)).toBe('folds fine detail into grain and jagged edges');
  });

  it('does not call a fold to zero frequency bands or moiré: it only shifts the tone', () => {
    const name = patternName(pattern('fold', { fx: 0, fy: 0 }));
    expect(name).toBe('folds into an even tone shift (no bands)');
    expect(name).not.toMatch(/moir/i);
  });

  it('names beats with the period of their swell, 1 / (1 - 2f) for f = 0.473 (19 px)', () => {
    // A grating at 0.473 cycles per output px beats at 1 - 2 x 0.473 = 0.054: every 18.5 px.
    expect(patternName(pattern('beat', { fx: 1 - 2 * 0.473, fy: 0 }))).toBe('beats, swelling and fading every 18.5 output px');
  });

  it('says that a clean pattern passes cleanly', () => {
    expect(patternName(pattern('clean', { fx: 0.2, fy: 0 }))).toBe('passes cleanly');
  });
});

import { describe, expect, it } from 'vitest';
import { CEIL_DB, FLOOR_DB, HIGH_DB, levelOf, LOW_DB, scoreOf } from '../../../src/core/risk/index.js';
import { decodeSrgb } from './patterns.js';

describe('level thresholds in 8-bit output terms', () => {
  // IEC 61966-2-1 (CHECKS.md): code 188 -> 0.502886 linear; the next code is one step away.
  const step = decodeSrgb(189 / 255) - decodeSrgb(188 / 255);
  // A full-contrast grating 0.5 +- 0.4 has RMS 0.4 / sqrt(2) (Parseval).
  const rms = 0.4 / Math.SQRT2;
  const aliasRms = (db: number) => rms * 10 ** (db / 20);

  it('puts the low threshold under half an 8-bit code step at mid-grey', () => {
    expect(decodeSrgb(188 / 255)).toBeCloseTo(0.502886, 5);
    expect(aliasRms(LOW_DB)).toBeLessThan(0.5 * step);
  });

  it('puts the high threshold at several code steps', () => {
    expect(aliasRms(HIGH_DB)).toBeGreaterThan(4 * step);
  });

  it('maps the dB scale onto 0..1 with the levels in order', () => {
    expect(FLOOR_DB).toBeLessThan(LOW_DB);
    expect(HIGH_DB).toBeLessThan(CEIL_DB);
    expect(scoreOf(10 ** (LOW_DB / 10))).toBeCloseTo((LOW_DB - FLOOR_DB) / (CEIL_DB - FLOOR_DB), 12);
    expect(levelOf(10 ** ((LOW_DB - 0.1) / 10))).toBe('low');
    expect(levelOf(10 ** ((LOW_DB + 0.1) / 10))).toBe('moderate');
    expect(levelOf(10 ** ((HIGH_DB + 0.1) / 10))).toBe('high');
  });
});

import { describe, expect, it } from 'vitest';
import { negotiateFormat } from '../../src/codec/negotiate.js';

// Accept semantics: RFC 9110 §12.5.1 (most specific range wins) and §12.4.2 (qvalue grammar,
// q=0 means "not acceptable"). The browser Accept strings are what those browsers send for
// <img> requests (from memory).
const chrome = 'image/avif,image/webp,image/apng,image/svg+xml,image/*,*/*;q=0.8';
const olderSafari = 'image/webp,image/png,image/svg+xml,image/*;q=0.8,video/*;q=0.8,*/*;q=0.5';
const firefoxNoAvif = 'image/webp,*/*';

describe('negotiateFormat', () => {
  it.each([
    // [accept, hasAlpha, expected, why]
    [chrome, false, 'avif', 'avif named, preferred'],
    [chrome, true, 'avif', 'avif carries alpha'],
    [olderSafari, false, 'webp', 'no avif: webp next'],
    [olderSafari, true, 'webp', 'webp carries alpha'],
    [firefoxNoAvif, false, 'webp', 'webp named'],
    ['image/jpeg', false, 'jpeg', 'only jpeg'],
    ['image/jpeg', true, 'jpeg', 'only jpeg is acceptable even with alpha (flattened)'],
    ['image/png,image/jpeg', true, 'png', 'alpha prefers png among equals'],
    ['image/png,image/jpeg', false, 'jpeg', 'opaque prefers jpeg among equals'],
    ['image/*', false, 'jpeg', 'a wildcard does not imply avif or webp'],
    ['image/*', true, 'png', 'a wildcard with alpha: png'],
    ['*/*', false, 'jpeg', 'curl default'],
    [undefined, false, 'jpeg', 'no header'],
    [undefined, true, 'png', 'no header, alpha'],
    ['', false, 'jpeg', 'empty header'],
    ['text/html', false, 'jpeg', 'nothing acceptable: the default, not a 406'],
    ['image/avif;q=0,image/webp', false, 'webp', 'q=0 refuses avif'],
    ['image/avif;q=0.0,image/webp;q=0', false, 'jpeg', 'both modern formats refused'],
    ['image/webp;q=0.9,image/avif;q=0.5', false, 'webp', 'higher q wins over preference'],
    ['image/jpeg,image/avif;q=0.5', false, 'jpeg', 'jpeg at q=1 beats avif at 0.5'],
    ['image/*;q=0.8,image/jpeg;q=0', false, 'png', 'specific q=0 beats the wildcard for jpeg'],
    ['IMAGE/AVIF', false, 'avif', 'media types are case-insensitive (RFC 9110 §8.3.1)'],
    [' image/webp ; q=0.7 , image/jpeg;q=0.6', false, 'webp', 'white space around parameters'],
    ['image/avif;q=2,image/webp', false, 'webp', 'an invalid qvalue drops that range'],
    ['image/avif;q=0.1234,image/jpeg;q=0.1', false, 'jpeg', 'four decimals is not a qvalue'],
    ['image/avif;level=1;q=0.5,image/jpeg;q=0.4', false, 'avif', 'other parameters are ignored'],
  ] as [string | undefined, boolean, string, string][])('%s (alpha %s) -> %s: %s', (accept, alpha, expected) => {
    expect(negotiateFormat(accept, alpha)).toBe(expected);
  });

  it('reads no further than 64 media ranges', () => {
    const junk = Array.from({ length: 64 }, (_, i) => `x/y${i}`).join(',');
    expect(negotiateFormat(`${junk},image/avif`, false)).toBe('jpeg');
    expect(negotiateFormat(`image/avif,${junk}`, false)).toBe('avif');
  });
});

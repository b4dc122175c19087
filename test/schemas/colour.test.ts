/**
 * The one grammar of the background colour (src/schemas/colour.ts): CSS Color Module Level 4
 * §5.2 hex notation with 3 or 6 digits, `#` optional; the query parses it once, to an Rgb.
 */
import { describe, expect, it } from 'vitest';
import { kernelNames } from '../../src/core/index.js';
import { canonicalQuery } from '../../src/schemas/canonical.js';
import { hexOf, parseHexColour } from '../../src/schemas/colour.js';
import { compileRenditionQuery } from '../../src/schemas/rendition.js';

const query = compileRenditionQuery({ maxDimension: 4096, kernelNames });

describe('the background colour', () => {
  it.each([
    ['#abc', { r: 0xaa, g: 0xbb, b: 0xcc }], // CSS Color 4 §5.2: each digit doubled
    ['abc', { r: 0xaa, g: 0xbb, b: 0xcc }],
    ['#102030', { r: 16, g: 32, b: 48 }],
    ['FFfF00', { r: 255, g: 255, b: 0 }],
  ])('reads %s', (text, rgb) => {
    expect(parseHexColour(text)).toEqual(rgb);
  });

  it.each(['red', '#12345', '#1234', '#12345678', 'transparent', '#ggg', ''])('refuses %j', (text) => {
    expect(parseHexColour(text)).toBeUndefined();
    expect(() => query.parse({ width: '10', background: text })).toThrow(/background must be a hex colour/);
  });

  it('is an Rgb in the parsed query, white when left out, and #rrggbb in the canonical form', () => {
    expect(query.parse({ width: '10' }).background).toEqual({ r: 255, g: 255, b: 255 });
    const q = query.parse({ width: '10', background: 'ABC' });
    expect(q.background).toEqual({ r: 0xaa, g: 0xbb, b: 0xcc });
    expect(hexOf(q.background)).toBe('#aabbcc');
    expect(canonicalQuery(q)).toBe('background=%23aabbcc&width=10');
    expect(canonicalQuery(query.parse({ width: '10', background: 'fff' }))).toBe('width=10');
  });
});

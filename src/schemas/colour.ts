import { z } from 'zod';

/** An opaque sRGB-encoded colour, 0..255 per channel. */
export interface Rgb {
  r: number;
  g: number;
  b: number;
}

/** CSS Color Module Level 4 §5.2 hex notation, 3 or 6 digits; the `#` may be left out (in a URL it must be written %23). */
const hex = /^#?([0-9a-f]{3}|[0-9a-f]{6})$/i;

/** "#abc", "abc", "#aabbcc" or "aabbcc" -> the colour; anything else -> undefined. */
export function parseHexColour(text: string): Rgb | undefined {
  const m = hex.exec(text);
  if (!m) return undefined;
  const h = m[1].length === 3 ? [...m[1]].map((c) => c + c).join('') : m[1];
  const byte = (i: number) => parseInt(h.slice(2 * i, 2 * i + 2), 16);
  return { r: byte(0), g: byte(1), b: byte(2) };
}

/** The colour as `#rrggbb`, lower case (the canonical spelling). */
export function hexOf(c: Rgb): string {
  return `#${[c.r, c.g, c.b].map((v) => v.toString(16).padStart(2, '0')).join('')}`;
}

/** A hex colour query parameter: parsed once, here, to an Rgb; `fallback` when left out. */
export function hexColour(message: string, fallback: string) {
  return z
    .string()
    .transform((text, ctx) => {
      const colour = parseHexColour(text);
      if (!colour) ctx.addIssue({ code: 'custom', message });
      return colour ?? { r: 0, g: 0, b: 0 };
    })
    .prefault(fallback);
}

import { FoldwiseError } from '../errors.js';

/** An sRGB-encoded colour, 0..255 per channel, alpha 0..1. */
export interface Rgba {
  r: number;
  g: number;
  b: number;
  alpha: number;
}

/**
 * Parses a background colour: `#rgb`, `#rgba`, `#rrggbb`, `#rrggbbaa` (CSS Color Module
 * Level 4, §5.2 hex notation; the `#` may be left out, as it must be escaped in a URL) or
 * the keyword `transparent`.
 *
 * @throws FoldwiseError ERR_PARAM_INVALID
 */
export function parseBackground(text: string): Rgba {
  const t = text.trim().toLowerCase();
  if (t === 'transparent') return { r: 0, g: 0, b: 0, alpha: 0 };
  const hex = t.startsWith('#') ? t.slice(1) : t;
  if (!/^(?:[0-9a-f]{3,4}|[0-9a-f]{6}|[0-9a-f]{8})$/.test(hex)) {
    throw new FoldwiseError(
      'ERR_PARAM_INVALID',
      `background must be a hex colour (#rgb, #rrggbb, #rrggbbaa) or transparent, not "${text.slice(0, 40)}".`,
    );
  }
  const full = hex.length <= 4 ? [...hex].map((c) => c + c).join('') : hex;
  const byte = (i: number) => parseInt(full.slice(2 * i, 2 * i + 2), 16);
  return { r: byte(0), g: byte(1), b: byte(2), alpha: full.length === 8 ? byte(3) / 255 : 1 };
}

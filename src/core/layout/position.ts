import type { Position } from './index.js';

/**
 * Parses a CSS object-position value into fractions (CSS Images Module Level 3, §5.6, whose
 * grammar is <position> of CSS Values and Units Level 4, §9.1, with the meaning of
 * background-position in CSS Backgrounds and Borders Module Level 3, §3.6).
 *
 * Accepted, case-insensitive, separated by white space:
 * - one value: a keyword or a percentage; the other axis is centred (`top` = `50% 0%`,
 *   `30%` = `30% 50%`);
 * - two values: keywords in either order (`top left` = `left top`), or horizontal then
 *   vertical when a percentage is among them (`left 30%`, `25% bottom`);
 * - four values: edge offset edge offset (`right 10% bottom 20%` = `90% 80%`), either order.
 * Percentages must lie in 0..100 % (a crop may not leave the source); lengths are not
 * accepted because the source's CSS pixel size is unknown here.
 *
 * @returns fractions 0..1 per axis, or undefined when the text is not such a value.
 */
export function parsePosition(text: string): Position | undefined {
  const tokens = text.trim().toLowerCase().split(/\s+/);
  if (tokens.length === 1) return one(tokens[0]);
  if (tokens.length === 2) return two(tokens[0], tokens[1]);
  if (tokens.length === 4) return four(tokens);
  return undefined;
}

type Axis = 'x' | 'y' | 'either';
const keywords: Record<string, { axis: Axis; at: number }> = {
  left: { axis: 'x', at: 0 },
  right: { axis: 'x', at: 1 },
  top: { axis: 'y', at: 0 },
  bottom: { axis: 'y', at: 1 },
  center: { axis: 'either', at: 0.5 },
};

/** The keyword's meaning; own keys only, so 'constructor' or '__proto__' is no keyword. */
function keyword(token: string): { axis: Axis; at: number } | undefined {
  return Object.hasOwn(keywords, token) ? keywords[token] : undefined;
}

/** A CSS <percentage>: a <number> (digits, or digits only after a point: CSS Syntax 3, 'consume a number', from memory) and `%`. */
function percent(token: string): number | undefined {
  if (!/^\+?(?:\d+|\d*\.\d+)%$/.test(token)) return undefined;
  const v = Number(token.slice(0, -1));
  return v >= 0 && v <= 100 ? v / 100 : undefined;
}

function one(token: string): Position | undefined {
  const k = keyword(token);
  if (k) return k.axis === 'y' ? { x: 0.5, y: k.at } : { x: k.at, y: 0.5 };
  const p = percent(token);
  return p === undefined ? undefined : { x: p, y: 0.5 };
}

function two(a: string, b: string): Position | undefined {
  const ka = keyword(a);
  const kb = keyword(b);
  if (ka && kb) {
    // Two keywords: order free, but not both on one axis (`left right`, `top top`).
    if (ka.axis === 'y' || kb.axis === 'x') {
      if (ka.axis === 'x' || kb.axis === 'y') return undefined;
      return { x: kb.at, y: ka.at };
    }
    return { x: ka.at, y: kb.at };
  }
  // With a percentage the first value is horizontal, the second vertical.
  const x = ka ? (ka.axis === 'y' ? undefined : ka.at) : percent(a);
  const y = kb ? (kb.axis === 'x' ? undefined : kb.at) : percent(b);
  return x === undefined || y === undefined ? undefined : { x, y };
}

function four(t: string[]): Position | undefined {
  const first = edgeOffset(t[0], t[1]);
  const second = edgeOffset(t[2], t[3]);
  if (!first || !second || first.axis === second.axis) return undefined;
  return first.axis === 'x' ? { x: first.at, y: second.at } : { x: second.at, y: first.at };
}

/** `right 10%` is 10 % in from the right edge: 90 % (Backgrounds 3, §3.6). */
function edgeOffset(edge: string, offset: string): { axis: 'x' | 'y'; at: number } | undefined {
  const k = keyword(edge);
  const p = percent(offset);
  if (!k || k.axis === 'either' || p === undefined) return undefined;
  return { axis: k.axis, at: k.at === 0 ? p : 1 - p };
}

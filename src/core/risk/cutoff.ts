/**
 * prefilter=auto: lower, per axis, only as much of the cut-off as makes every false pattern
 * invisible. The stretched kernel's response at cut-off factor c is H(f / c) (stretching a
 * kernel by 1/c scales its frequency axis by c), so the search needs the plan's own response
 * once, sampled (AxisGain). Nothing visible: nothing changes (c = 1).
 */
import { VISIBLE_MARGIN } from './levels.js';
import { see, type Scene, type Seen } from './see.js';
import type { Gain, VisiblePattern } from './visibility.js';

/**
 * auto never lowers an axis's cut-off below 0.6 of the kernel's own: the passband up to half
 * the new Nyquist (the detail a rendition is for) keeps its response, since the designed
 * kernel's transition is 0.8x..1.3x wide and 0.6 * 0.8 = 0.48.
 */
export const CUT_MIN = 0.6;
/** Aim under the visible margin so the result does not sit on the boundary. */
const AIM = 0.8 * VISIBLE_MARGIN;
const STEP = 0.01;
/**
 * The broadband fold (grain, edges: no false bands) is acted on once visible through the
 * rendition's own detail (see.ts: masking).
 */
export const BROADBAND_ACT = VISIBLE_MARGIN;

/** The plan's response of one axis sampled from 0 to 0.5 cycles per source pixel. */
export function sampledGain(response: (f: number) => number, nyquist: number, tileSize: number): Gain {
  const step = Math.min(nyquist / 32, 1 / (2 * Math.max(8, tileSize)));
  const n = Math.ceil(0.5 / step) + 1;
  const t = new Float64Array(n + 1);
  for (let k = 0; k <= n; k++) t[k] = Math.abs(response(Math.min(0.5, k * step)));
  return (f: number) => {
    const u = Math.abs(f) / step;
    if (!(u < n)) return t[n];
    const i = Math.floor(u);
    return t[i] + (t[i + 1] - t[i]) * (u - i);
  };
}

export interface AutoCutoff {
  cutoff: { x: number; y: number };
  /** The planned rendition as the model sees it with these cut-offs. */
  seen: Seen;
  /** An axis reached CUT_MIN with a pattern still visible. */
  capped: boolean;
}

const scaled = (h: Gain, c: number): Gain => (c >= 1 ? h : (f) => h(f / c));

/** The axis whose cut-off governs a line pattern: the one nearer (or beyond) its Nyquist. */
function axisOf(scene: Scene, p: VisiblePattern): 'x' | 'y' {
  return Math.abs(scene.scale.x * p.frequency.fx) >= Math.abs(scene.scale.y * p.frequency.fy) ? 'x' : 'y';
}

/** Largest c <= from (step STEP, down to CUT_MIN) with h(f / c) <= want. */
function lowerUntil(h: Gain, f: number, want: number, from: number): number {
  let c = from;
  while (c - STEP >= CUT_MIN - 1e-9 && h(f / c) > want) c -= STEP;
  return Math.max(CUT_MIN, c);
}

/** Per-axis cut-off factors for prefilter=auto; only axes that shrink move. */
export function autoCutoff(scene: Scene, hx: Gain, hy: Gain): AutoCutoff {
  const c = { x: 1, y: 1 };
  const movable = { x: scene.scale.x > 1, y: scene.scale.y > 1 };
  let seen = see(scene, hx, hy);
  for (let round = 0; round < 40 && seen.margin >= VISIBLE_MARGIN; round++) {
    const next = { ...c };
    for (const p of seen.patterns) {
      if (p.kind === 'clean' || p.margin < AIM) continue;
      if (p.source === 'line') {
        const axis = axisOf(scene, p);
        if (!movable[axis]) continue;
        const h = axis === 'x' ? hx : hy;
        const f = Math.abs(axis === 'x' ? p.frequency.fx : p.frequency.fy);
        const want = (h(f / c[axis]) * AIM) / p.margin;
        next[axis] = Math.min(next[axis], lowerUntil(h, f, want, c[axis]));
      } else if (seen.margin >= BROADBAND_ACT && p.margin >= BROADBAND_ACT) {
        // The broadband fold: step down the axes on which its strongest cell lies beyond Nyquist.
        const beyond = { x: Math.abs(scene.scale.x * p.frequency.fx) > 0.5, y: Math.abs(scene.scale.y * p.frequency.fy) > 0.5 };
        for (const axis of ['x', 'y'] as const) {
          if (movable[axis] && beyond[axis]) next[axis] = Math.max(CUT_MIN, Math.min(next[axis], c[axis] - 2 * STEP));
        }
      }
    }
    if (next.x === c.x && next.y === c.y) break;
    c.x = next.x;
    c.y = next.y;
    seen = see(scene, scaled(hx, c.x), scaled(hy, c.y));
  }
  const capped = seen.margin >= VISIBLE_MARGIN && (c.x <= CUT_MIN || c.y <= CUT_MIN || !movable.x || !movable.y);
  return { cutoff: c, seen, capped };
}

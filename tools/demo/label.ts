import { drawText, textWidth } from './font.js';
import { fillRect, line, rgb, type Picture, type Rgb } from './picture.js';
import { shopName } from './shopfront.js';
import { liftPlans, vary, weave } from './weave.js';

const W = 1600;
const H = 2000;
const ink = rgb(34, 34, 48);

/**
 * A woven care label: fine cream weave (1.7 px threads), the shop's name, the fibre, care
 * symbols drawn as outlines, and paragraphs of 5x7-pixel print at one and two pixels per
 * font cell: the finest detail of the demo set.
 */
export function careLabel(): Picture {
  const cream = rgb(240, 234, 216);
  const p = weave({
    width: W,
    height: H,
    pitch: 1.7,
    seed: 0xca7e,
    warp: (_i, j) => vary(cream, j, 0.04),
    weft: (_j, j) => vary(cream, j, 0.04),
    warpUp: liftPlans.plain,
    fibre: 0,
  });
  // Stitched hem, dashed.
  for (let x = 40; x < W - 40; x += 16) {
    fillRect(p, x, 40, x + 9, 43, ink);
    fillRect(p, x, H - 43, x + 9, H - 40, ink);
  }
  centred(p, shopName, 120, 7, ink);
  centred(p, '100% MERINO WOOL', 260, 10, ink);
  centred(p, 'WOVEN IN OUR OWN WORKSHOP', 400, 4, ink);
  symbols(p, 520);
  const fine = [
    'HAND WASH IN COOL WATER, 30 C AT MOST. USE A MILD WOOL DETERGENT.',
    'DO NOT BLEACH. DO NOT TUMBLE DRY. RESHAPE WHILE DAMP AND DRY FLAT.',
    'COOL IRON UNDER A DAMP CLOTH. PROFESSIONAL DRY CLEAN ALLOWED.',
    'STORE FOLDED, AWAY FROM DIRECT SUN. NATURAL FIBRES MAY PILL AT FIRST.',
  ];
  fine.forEach((text, n) => drawText(p, text, 100, 800 + n * 26, 2, ink));
  const finest = [
    'STYLE 0417 / LOT 23-118 / SIZE 180 X 30 CM / WEIGHT 210 G',
    'WARP AND WEFT: 2/28 NM WORSTED, 24 ENDS AND 22 PICKS PER CM.',
    'COLOURS MAY VARY SLIGHTLY FROM DYE LOT TO DYE LOT (THIS IS NORMAL).',
    'KEEP THIS LABEL: IT TELLS US HOW TO MEND YOUR SCARF LATER.',
  ];
  for (let block = 0; block < 3; block++) {
    finest.forEach((text, n) => drawText(p, text, 100, 960 + block * 110 + n * 11, 1, ink));
  }
  centred(p, 'THANK YOU FOR BUYING FROM A SMALL SHOP', 1400, 3, ink);
  for (let y = 1480; y < 1900; y += 4) fillRect(p, 100, y, W - 100, y + 1, rgb(180, 172, 156));
  return p;
}

function centred(p: Picture, text: string, y: number, scale: number, c: Rgb): void {
  drawText(p, text, Math.round((W - textWidth(text, scale)) / 2), y, scale, c);
}

/** Washtub with 30, crossed triangle, square with crossed circle, iron with one dot, circled P. */
function symbols(p: Picture, y: number): void {
  const w = 4;
  const size = 160;
  const gap = (W - 200 - 5 * size) / 4;
  const at = (n: number) => 100 + n * (size + gap);
  let x = at(0);
  line(p, x, y + 40, x + 20, y + size, w, ink);
  line(p, x + 20, y + size, x + size - 20, y + size, w, ink);
  line(p, x + size - 20, y + size, x + size, y + 40, w, ink);
  line(p, x, y + 40, x + size, y + 40, w, ink);
  drawText(p, '30', x + 50, y + 70, 6, ink);
  x = at(1);
  line(p, x + size / 2, y, x, y + size, w, ink);
  line(p, x, y + size, x + size, y + size, w, ink);
  line(p, x + size, y + size, x + size / 2, y, w, ink);
  line(p, x, y, x + size, y + size, w, ink);
  line(p, x + size, y, x, y + size, w, ink);
  x = at(2);
  for (const [a, b, c, d] of [[0, 0, size, 0], [size, 0, size, size], [size, size, 0, size], [0, size, 0, 0]]) {
    line(p, x + a, y + b, x + c, y + d, w, ink);
  }
  circle(p, x + size / 2, y + size / 2, size / 2 - 20, w);
  line(p, x, y, x + size, y + size, w, ink);
  line(p, x + size, y, x, y + size, w, ink);
  x = at(3);
  line(p, x + 10, y + size - 20, x + size, y + size - 20, w, ink);
  line(p, x + 10, y + size - 20, x + 50, y + 40, w, ink);
  line(p, x + 50, y + 40, x + size - 20, y + 40, w, ink);
  line(p, x + size - 20, y + 40, x + size, y + size - 20, w, ink);
  fillRect(p, x + 80, y + 90, x + 92, y + 102, ink);
  x = at(4);
  circle(p, x + size / 2, y + size / 2, size / 2 - 4, w);
  drawText(p, 'P', x + 62, y + 52, 8, ink);
}

function circle(p: Picture, cx: number, cy: number, r: number, w: number): void {
  const steps = 180;
  for (let s = 0; s < steps; s++) {
    const a = (2 * Math.PI * s) / steps;
    const b = (2 * Math.PI * (s + 1)) / steps;
    line(p, cx + r * Math.cos(a), cy + r * Math.sin(a), cx + r * Math.cos(b), cy + r * Math.sin(b), w, ink);
  }
}

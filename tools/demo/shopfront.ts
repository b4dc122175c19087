import { drawText, textWidth } from './font.js';
import { createPicture, fillRect, line, rgb, type Picture, type Rgb } from './picture.js';
import { mulberry32, randomTable } from './prng.js';

/** Our own shop's name, drawn on its sign and label. Invented for the demo. */
export const shopName = 'FOLDWISE CLOTH & THREAD';

const W = 2400;
const H = 1800;
const gold = rgb(212, 178, 96);
const green = rgb(26, 62, 46);
const cream = rgb(236, 228, 206);

/**
 * The shop's brick front: running-bond brickwork (36 x 12 px bricks, 3 px joints), a sign
 * with its name and a line of small print, a striped awning, a window with glazing bars and
 * fine blind slats, a door, and a notice in 5x7-pixel print.
 */
export function brickFront(): Picture {
  const rand = mulberry32(0xb71c);
  const p = createPicture(W, H, 3, [0, 0, 0]);
  bricks(p, rand);
  sign(p);
  awning(p);
  shopWindow(p);
  door(p);
  fillRect(p, 0, 1700, W, H, rgb(150, 148, 142));
  for (let x = 0; x < W; x += 160) fillRect(p, x, 1700, x + 2, H, rgb(110, 108, 104));
  return p;
}

function bricks(p: Picture, rand: () => number): void {
  const tone = randomTable(rand, 8192);
  const course = 15;
  const length = 39;
  const mortar = rgb(188, 182, 168);
  for (let y = 0; y < H; y++) {
    const row = Math.floor(y / course);
    const inCourse = y - row * course;
    const shift = row % 2 === 0 ? 0 : length / 2;
    for (let x = 0; x < W; x++) {
      const bx = x + shift;
      const col = Math.floor(bx / length);
      const joint = inCourse >= 12 || bx - col * length >= 36;
      const t = tone[(row * 97 + col * 31) & 8191];
      const grain = (rand() - 0.5) * 0.08;
      const c: Rgb = joint
        ? mortar
        : t > 0.9
          ? rgb(96, 48, 40)
          : [(150 + 40 * t) / 255, (66 + 24 * t) / 255, (48 + 10 * t) / 255];
      const o = (y * W + x) * 3;
      for (let k = 0; k < 3; k++) p.data[o + k] = c[k] * (1 + grain);
    }
  }
}

function centred(p: Picture, text: string, y: number, scale: number, ink: Rgb): void {
  drawText(p, text, Math.round((W - textWidth(text, scale)) / 2), y, scale, ink);
}

function sign(p: Picture): void {
  fillRect(p, 300, 150, 2100, 410, green);
  for (const inset of [12, 20]) {
    fillRect(p, 300 + inset, 150 + inset, 2100 - inset, 153 + inset, gold);
    fillRect(p, 300 + inset, 407 - inset, 2100 - inset, 410 - inset, gold);
  }
  centred(p, shopName, 200, 9, gold);
  centred(p, 'WOVENS - SHIRTINGS - TWEEDS - CLOTH BY THE METRE - EST. 2024', 300, 3, cream);
  centred(p, 'ALTERATIONS AND MADE-TO-MEASURE, ASK INSIDE. OPEN TUESDAY TO SATURDAY, 9 TO 17.', 350, 2, cream);
}

function awning(p: Picture): void {
  for (let y = 430; y < 560; y++) {
    for (let x = 220; x < 2180; x++) {
      const stripe = Math.floor((x - 220) / 10) % 2 === 0;
      const c = stripe ? cream : green;
      const fade = 0.8 + (0.2 * (y - 430)) / 130;
      fillRect(p, x, y, x + 1, y + 1, [c[0] * fade, c[1] * fade, c[2] * fade]);
    }
  }
}

function shopWindow(p: Picture): void {
  const [x0, y0, x1, y1] = [240, 620, 1300, 1560];
  for (let y = y0; y < y1; y++) {
    const g = 0.22 + (0.14 * (y - y0)) / (y1 - y0);
    fillRect(p, x0, y, x1, y + 1, [g * 0.8, g * 0.9, g]);
  }
  // Blind: 1 px slats every 5 px across the upper third.
  for (let y = y0 + 10; y < y0 + 320; y += 5) fillRect(p, x0, y, x1, y + 1, rgb(200, 200, 192));
  for (let x = x0 + 130; x < x1; x += 130) fillRect(p, x, y0, x + 2, y1, rgb(230, 230, 226));
  for (const [a, b, c, d] of [[x0, y0, x1, y0 + 8], [x0, y1 - 8, x1, y1], [x0, y0, x0 + 8, y1], [x1 - 8, y0, x1, y1]]) {
    fillRect(p, a, b, c, d, rgb(240, 240, 236));
  }
  // A notice taped inside the glass, in the smallest print.
  fillRect(p, 1010, 1300, 1250, 1420, rgb(244, 240, 228));
  const ink = rgb(30, 30, 30);
  ['CLOTH BY THE METRE', 'WOOL, LINEN, COTTON', 'SAMPLES ON REQUEST', 'CUT WHILE YOU WAIT', 'PAYMENT BY CARD'].forEach(
    (text, n) => drawText(p, text, 1020, 1310 + n * 20, 1, ink),
  );
  drawText(p, 'OPEN', 560, 1200, 4, gold);
}

function door(p: Picture): void {
  fillRect(p, 1480, 610, 1920, 1700, rgb(236, 232, 222));
  fillRect(p, 1500, 630, 1900, 1700, green);
  for (const [a, b] of [[680, 1080], [1140, 1640]]) {
    line(p, 1540, a, 1860, a, 3, rgb(16, 44, 32));
    line(p, 1540, b, 1860, b, 3, rgb(16, 44, 32));
    line(p, 1540, a, 1540, b, 3, rgb(16, 44, 32));
    line(p, 1860, a, 1860, b, 3, rgb(16, 44, 32));
  }
  fillRect(p, 1640, 1100, 1760, 1124, gold);
  drawText(p, '12', 1670, 1000 - 60, 6, gold);
  line(p, 1850, 1150, 1850, 1240, 8, gold);
}

/**
 * Demo pictures that are more than one sRGB still: a Display P3 product shot (dyes more
 * saturated than sRGB can hold, as phone cameras now record them) and an animated swatch.
 * Seeded code, like the rest of the demo: the same bytes on every run.
 */
import sharp from 'sharp';

export interface DemoExtra {
  path: string;
  describe: string;
  encode: () => Promise<Buffer>;
}

/** Dye colours in Display P3 codes; the first three lie outside sRGB. */
const dyes: readonly (readonly [number, number, number])[] = [
  [255, 96, 0], // marigold orange
  [0, 200, 70], // malachite green
  [235, 0, 60], // madder red
  [40, 70, 190], // indigo
  [250, 210, 40], // weld yellow
];

/** Hanks of dyed yarn side by side, with the twist of the yarn drawn as fine diagonal shading. */
async function dyedYarn(): Promise<Buffer> {
  const width = 1600;
  const height = 1000;
  const data = new Uint16Array(width * height * 3);
  const band = width / dyes.length;
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const dye = dyes[Math.min(dyes.length - 1, Math.floor(x / band))];
      // A 5.6 px twist; the hank's roundness darkens its edges.
      const twist = 0.86 + 0.14 * Math.sin((2 * Math.PI * (x + 0.6 * y)) / 5.6);
      const u = (x % band) / band - 0.5;
      const shade = twist * (1 - 0.5 * u * u);
      for (let c = 0; c < 3; c++) data[(y * width + x) * 3 + c] = Math.round(dye[c] * shade * 257);
    }
  }
  // From 16-bit samples sharp's working space is P3, so tagging P3 converts nothing.
  return sharp(data, { raw: { width, height, channels: 3 } }).withIccProfile('p3').jpeg({ quality: 92, chromaSubsampling: '4:4:4' }).toBuffer();
}

/** A gingham swatch drawn sliding under the light, 6 frames of 120 ms, looping. */
async function swatchTurn(): Promise<Buffer> {
  const width = 360;
  const height = 240;
  const frames = 6;
  const data = new Uint8Array(width * height * frames * 3);
  for (let f = 0; f < frames; f++) {
    for (let y = 0; y < height; y++) {
      for (let x = 0; x < width; x++) {
        const xs = x + 4 * f;
        const check = (Math.floor(xs / 14) % 2) + (Math.floor(y / 14) % 2);
        const light = 0.8 + 0.2 * Math.cos((2 * Math.PI * (x - 60 * f)) / width);
        const rgb = check === 2 ? [150, 20, 40] : check === 1 ? [214, 120, 130] : [246, 244, 240];
        const i = ((f * height + y) * width + x) * 3;
        for (let c = 0; c < 3; c++) data[i + c] = Math.round(rgb[c] * light);
      }
    }
  }
  return sharp(data, { raw: { width, height: height * frames, channels: 3, pageHeight: height } })
    .gif({ delay: new Array(frames).fill(120), loop: 0 })
    .toBuffer();
}

export const demoExtras: readonly DemoExtra[] = [
  { path: 'products/dyed-yarn-p3.jpg', describe: 'dyed yarn hanks in Display P3 (orange, green and red beyond sRGB)', encode: dyedYarn },
  { path: 'products/swatch-turn.gif', describe: 'animated gingham swatch, 6 frames', encode: swatchTurn },
];

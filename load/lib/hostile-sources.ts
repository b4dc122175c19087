/**
 * The hostile sources of load/hostile.ts, made with sharp from formulas (deterministic) and
 * kept in a temp folder across runs: 8192 x 8192 16-bit RGBA PNGs that are all zero (one of
 * them with one pixel set, so the four uploads differ), a small textile picture for the
 * "normal miss", and damaged JPEG and WebP files (flipped bytes, truncated, lying header).
 */
import { copyFileSync, existsSync, mkdirSync, mkdtempSync, renameSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import sharp from 'sharp';
import { weaveRaw as weave } from '../../test/helpers/damage.js';
import { makeSources } from './sources.js';

export const BOMB_SIDE = 8192;

export interface HostileSources {
  /** zero-0.png (all zero) .. zero-4.png (one pixel differs). */
  bombs: string[];
  /** 12 twelve-megapixel textile JPEGs. */
  large: string[];
  /** A 640 x 480 textile JPEG: each new width of it is a cheap, ordinary miss. */
  small: string;
  /** Damaged files, by name; every one of them must be refused. */
  corrupt: string[];
}

const cacheDir = join(tmpdir(), 'foldwise-hostile-sources');

async function bomb(file: string, marked: number): Promise<void> {
  const canvas = sharp({ create: { width: BOMB_SIDE, height: BOMB_SIDE, channels: 4, background: { r: 0, g: 0, b: 0, alpha: 0 } } });
  const pixel = { input: Buffer.from([0, 0, 0, 1]), raw: { width: 1, height: 1, channels: 4 as const }, left: marked, top: 0 };
  await (marked > 0 ? canvas.composite([pixel]) : canvas).toColourspace('rgb16').png({ compressionLevel: 9 }).toFile(file);
}

/** Inverts one byte in 64 over the middle third (past the headers, inside the scan data). */
function flipMiddle(bytes: Buffer): Buffer {
  const out = Buffer.from(bytes);
  const third = Math.floor(out.length / 3);
  for (let i = third; i < 2 * third; i += 64) out[i] ^= 0xff;
  return out;
}

/** A JPEG whose SOF0 frame header claims 8000 x 8000 over its real body. */
function lyingJpeg(bytes: Buffer): Buffer {
  const out = Buffer.from(bytes);
  for (let i = 2; i + 8 < out.length; i++) {
    if (out[i] === 0xff && (out[i + 1] === 0xc0 || out[i + 1] === 0xc2)) {
      out.writeUInt16BE(8000, i + 5);
      out.writeUInt16BE(8000, i + 7);
      return out;
    }
  }
  throw new Error('no SOF marker in the JPEG');
}

/** A lossy WebP whose VP8 frame header (after the start code 9d 01 2a) claims 8000 x 8000. */
function lyingWebp(bytes: Buffer): Buffer {
  const out = Buffer.from(bytes);
  const at = out.indexOf(Buffer.from([0x9d, 0x01, 0x2a]));
  if (at < 0) throw new Error('no VP8 start code in the WebP');
  out.writeUInt16LE(8000, at + 3);
  out.writeUInt16LE(8000, at + 5);
  return out;
}

async function corruptSet(dir: string): Promise<string[]> {
  const raw = sharp(weave(1200, 900), { raw: { width: 1200, height: 900, channels: 3 } });
  const jpeg = await raw.clone().jpeg({ quality: 90 }).toBuffer();
  const webp = await raw.clone().webp({ quality: 90 }).toBuffer();
  const files: Array<[string, Buffer]> = [
    ['flipped.jpg', flipMiddle(jpeg)],
    ['truncated.jpg', jpeg.subarray(0, Math.floor(jpeg.length * 0.6))],
    ['lying-header.jpg', lyingJpeg(jpeg)],
    ['flipped.webp', flipMiddle(webp)],
    ['truncated.webp', webp.subarray(0, Math.floor(webp.length * 0.6))],
    ['lying-header.webp', lyingWebp(webp)],
  ];
  for (const [name, bytes] of files) writeFileSync(join(dir, name), bytes);
  return files.map(([name]) => name);
}

/** Makes (once) and returns the hostile sources in the shared temp folder. */
export async function makeHostileSources(): Promise<HostileSources & { dir: string; largeDir: string }> {
  mkdirSync(cacheDir, { recursive: true });
  const bombs: string[] = [];
  for (let i = 0; i < 5; i++) {
    const name = `zero-${i}.png`;
    const file = join(cacheDir, name);
    if (!existsSync(file)) {
      await bomb(`${file}.part.png`, i);
      renameSync(`${file}.part.png`, file);
    }
    bombs.push(name);
  }
  const small = 'small.jpg';
  const smallRaw = sharp(weave(640, 480), { raw: { width: 640, height: 480, channels: 3 } });
  if (!existsSync(join(cacheDir, small))) await smallRaw.jpeg({ quality: 90 }).toFile(join(cacheDir, small));
  const corrupt = await corruptSet(cacheDir);
  const { dir: largeDir, names: large } = await makeSources(12);
  return { dir: cacheDir, largeDir, bombs, large, small, corrupt };
}

/** A fresh source folder for one server: copies of every hostile source. */
export function freshSourceDir(s: HostileSources & { dir: string; largeDir: string }): string {
  const dir = mkdtempSync(join(tmpdir(), 'foldwise-hostile-src-'));
  for (const name of [...s.bombs, s.small, ...s.corrupt]) copyFileSync(join(s.dir, name), join(dir, name));
  for (const name of s.large) copyFileSync(join(s.largeDir, name), join(dir, name));
  return dir;
}

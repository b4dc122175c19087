import { spawn } from 'node:child_process';
import { mkdir, mkdtemp, readdir, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { binPath, runCli } from './run-cli.js';

let dir: string;
let env: NodeJS.ProcessEnv;

/** A small analytic picture: a vertical cosine grating, 0.3 cycles per pixel. */
async function gratingPng(width: number, height: number): Promise<Buffer> {
  const data = Buffer.alloc(width * height);
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) data[y * width + x] = Math.round(127.5 + 127.5 * Math.cos(2 * Math.PI * 0.3 * x));
  }
  return sharp(data, { raw: { width, height, channels: 1 } }).png().toBuffer();
}

beforeAll(async () => {
  dir = await mkdtemp(join(tmpdir(), 'fw-cli-'));
  await mkdir(join(dir, 'shop', 'fabrics'), { recursive: true });
  await writeFile(join(dir, 'shop', 'fabrics', 'stripe.png'), await gratingPng(200, 100));
  await writeFile(join(dir, 'shop', 'label.png'), await gratingPng(120, 120));
  // A configuration of its own: no demo pictures, cache under the temporary folder.
  await writeFile(join(dir, 'config.json'), JSON.stringify({ origin: { generateDemo: false }, cache: { dir: join(dir, 'cache') }, pool: { threads: 1 } }));
  env = { FOLDWISE_CONFIG: join(dir, 'config.json') };
});
afterAll(() => rm(dir, { recursive: true, force: true }));

describe('foldwise render', () => {
  it('writes the rendition in the format of the output name', async () => {
    const out = join(dir, 'stripe-50.webp');
    const r = await runCli(['render', join(dir, 'shop', 'fabrics', 'stripe.png'), '--width', '50', '-o', out], { env });
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/^wrote .*stripe-50\.webp \(webp, \d+ bytes\)\nplan: scale=4\.000,4\.000; /);
    const meta = await sharp(out).metadata();
    expect([meta.format, meta.width, meta.height]).toEqual(['webp', 50, 25]);
  });

  it('takes every rendition parameter as a flag: fit, position, density, background, light', async () => {
    const out = join(dir, 'stripe-box.png');
    const args = ['--width', '50', '--height', '50', '--density', '2', '--fit', 'contain', '--position', 'center top'];
    const r = await runCli(['render', join(dir, 'shop', 'fabrics', 'stripe.png'), ...args, '--background', '102030', '--light', 'encoded', '-o', out], { env });
    expect([r.code, r.stderr]).toEqual([0, '']);
    expect(r.stdout).toMatch(/light=encoded/);
    const { data, info } = await sharp(out).toColourspace('srgb').removeAlpha().raw().toBuffer({ resolveWithObject: true });
    expect([info.width, info.height]).toEqual([100, 100]); // density 2 doubles the 50 x 50 box
    // The 2:1 picture sits at the top (position), the bar below has the background colour.
    const at = (x: number, y: number) => [...data.subarray((y * 100 + x) * 3, (y * 100 + x) * 3 + 3)];
    expect(at(50, 90)).toEqual([16, 32, 48]);
    expect(at(50, 20)).not.toEqual([16, 32, 48]);
  });

  it('refuses a bad command line with exit 2 and a missing file with exit 1', async () => {
    const src = join(dir, 'shop', 'label.png');
    const noSize = await runCli(['render', src, '-o', join(dir, 'x.png')], { env });
    expect([noSize.code, noSize.stderr]).toEqual([2, expect.stringContaining('give --width, --height, or both')]);
    const zero = await runCli(['render', src, '--width', '0', '-o', join(dir, 'x.png')], { env });
    expect([zero.code, zero.stderr]).toEqual([2, expect.stringContaining('width must be an integer from 1 to')]);
    const badPrefilter = await runCli(['render', src, '--width', '10', '--prefilter', 'lots', '-o', join(dir, 'x.png')], { env });
    expect([badPrefilter.code, badPrefilter.stderr]).toEqual([2, expect.stringContaining('prefilter')]);
    const missing = await runCli(['render', join(dir, 'nope.png'), '--width', '10', '-o', join(dir, 'x.png')], { env });
    expect([missing.code, missing.stderr]).toEqual([1, expect.stringContaining('ERR_SOURCE_NOT_FOUND')]);
  });
});

describe('foldwise risk', () => {
  it('prints a readable table, the API JSON with the peak where the sampling theorem puts it, and the heat map', async () => {
    const src = join(dir, 'shop', 'fabrics', 'stripe.png');
    const table = await runCli(['risk', src, '--width', '50'], { env });
    expect(table.code).toBe(0);
    for (const label of ['source', 'target', 'level', 'folded', 'sigma', 'plan', 'peaks', 'regions', 'reason']) {
      expect(table.stdout).toMatch(new RegExp(`^${label}( |$)`, 'm'));
    }
    expect(table.stdout).toMatch(/^target {5}50 x 25 {2}\(scale 4\.000 x 4\.000\)$/m);

    const map = join(dir, 'stripe-risk.png');
    const json = await runCli(['risk', src, '--width', '50', '--json', '--map', map], { env });
    expect(json.code).toBe(0);
    const view = JSON.parse(json.stdout); // the body of GET /v1/alias-risk/{source}
    expect(view.target).toEqual({ width: 50, height: 25 });
    // Sampling theorem (Shannon 1949; CHECKS.md): 0.3 cycles/px decimated by 4 appears at
    // |4 x 0.3 - round(4 x 0.3)| = 0.2 cycles per output pixel.
    const [peak] = view.peaks;
    expect(peak.kind).toBe('periodic');
    expect(Math.abs(Math.abs(peak.fx) - 0.3)).toBeLessThan(1 / 64);
    expect(Math.abs(peak.aliasTo.fx - 0.2)).toBeLessThan(4 / 64);
    expect(view.folded.unfiltered).toBeGreaterThan(0.5);
    const meta = await sharp(map).metadata();
    // A 200x100 preview, widened to the legend's 584 px, with the 96 px legend beneath it.
    expect([meta.format, meta.width, meta.height]).toEqual(['png', 584, 100 + 96]);

    const usage = await runCli(['risk', src], { env });
    expect([usage.code, usage.stderr]).toEqual([2, expect.stringContaining('give --width, --height, or both')]);
  });
});

describe('foldwise warm', () => {
  it('pre-renders a folder into the cache with a progress bar, then finds it all cached', async () => {
    const first = await runCli(['warm', join(dir, 'shop'), '--widths', '30,60', '--formats', 'webp'], { env });
    expect(first.code).toBe(0);
    expect(first.stderr).toMatch(/warm \|[=]+\| 2\/2 files \| 4 renditions \| ETA \d+s \|/);
    // The summary table: a header, one row per file, a total row; numbers aligned right.
    const lines = first.stdout.split('\n');
    expect(lines[0]).toMatch(/^ {2}file +rendered {2}cached +bytes {2}warnings {2}result$/);
    expect(lines[1]).toMatch(/^ {2}-+ {2}-{8} {2}-{6} {2}-+ {2}-{8} {2}-+$/);
    const row = (name: string) => lines.find((l) => l.startsWith(`  ${name} `)) ?? '';
    expect(row('fabrics/stripe.png')).toMatch(/^ {2}fabrics\/stripe\.png +2 +0 +[\d.]+ (B|KiB) +\d+ {2}ok$/);
    expect(row('label.png')).toMatch(/^ {2}label\.png +2 +0 +[\d.]+ (B|KiB) +\d+ {2}ok$/);
    expect(row('2 files')).toMatch(/^ {2}2 files +4 +0 +[\d.]+ (B|KiB) +\d+ {2}2 ok, 0 failed, \d+\.\d s$/);
    // Each column starts at the same place on every row (the header's "cached" ends where the numbers do).
    const end = lines[0].indexOf('cached') + 'cached'.length;
    for (const name of ['fabrics/stripe.png', 'label.png', '2 files']) expect(row(name)[end - 1], name).toBe('0');
    expect((await readdir(join(dir, 'cache'), { recursive: true })).length).toBeGreaterThan(0);

    // A new process: only the disk tier remembers, and it has every rendition.
    const second = await runCli(['warm', join(dir, 'shop'), '--widths', '30,60', '--formats', 'webp', '--no-progress'], { env });
    expect(second.code).toBe(0);
    expect(second.stderr).toBe('');
    expect(second.stdout).toMatch(/^ {2}2 files +0 +4 +0 B +\d+ {2}2 ok, 0 failed, /m);
  });

  it('counts a corrupt file as failed and exits 1', async () => {
    const bad = join(dir, 'broken');
    await mkdir(bad);
    await writeFile(join(bad, 'torn.png'), (await gratingPng(64, 64)).subarray(0, 60));
    const r = await runCli(['warm', bad, '--widths', '30', '--no-progress'], { env });
    expect(r.code).toBe(1);
    expect(r.stdout).toMatch(/^ {2}torn\.png +0 +0 +0 B +0 {2}failed: \S/m);
    expect(r.stdout).toMatch(/^ {2}1 files +0 +0 +0 B +0 {2}0 ok, 1 failed, /m);
    expect(r.stderr).toContain('1 of 1 files failed');
  });
});

describe('foldwise serve', () => {
  it('listens like npm start and stops cleanly on SIGTERM', async () => {
    const child = spawn(process.execPath, [binPath, 'serve', '--port', '0', '--host', '127.0.0.1', '--sources', join(dir, 'shop')], {
      env: { ...process.env, ...env },
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    const exited = new Promise<number | null>((resolve) => child.on('close', resolve));
    // The server logs (pino, JSON lines) the address it listens on: wait for that line.
    const address = await new Promise<string>((resolve, reject) => {
      let text = '';
      child.stdout.setEncoding('utf8').on('data', (d: string) => {
        text += d;
        const m = /listening at (http:\/\/127\.0\.0\.1:\d+)/.exec(text);
        if (m) resolve(m[1]);
      });
      child.on('close', () => reject(new Error(`server exited early: ${text}`)));
    });
    const health = await fetch(`${address}/healthz`);
    expect(health.status).toBe(200);
    const rendition = await fetch(`${address}/v1/renditions/fabrics/stripe.png?width=40&format=png`);
    expect(rendition.status).toBe(200);
    child.kill('SIGTERM');
    expect(await exited).toBe(0);
  });

  it('stops cleanly when SIGTERM comes while it warms up, and prints no start failure', async () => {
    const child = spawn(process.execPath, [binPath, 'serve', '--port', '0', '--host', '127.0.0.1', '--sources', join(dir, 'shop')], {
      env: { ...process.env, ...env },
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    let stderr = '';
    child.stderr.setEncoding('utf8').on('data', (d: string) => (stderr += d));
    const exited = new Promise<number | null>((resolve) => child.on('close', resolve));
    // "listening at" comes before the render threads and the render path are warmed ("foldwise ready").
    let text = '';
    child.stdout.setEncoding('utf8').on('data', (d: string) => {
      const before = text;
      text += d;
      if (!/listening at/.test(before) && /listening at/.test(text)) child.kill('SIGTERM');
    });
    expect(await exited).toBe(0);
    expect(stderr).toBe('');
    expect(text).toMatch(/"msg":"shutdown complete"/);
  });
});

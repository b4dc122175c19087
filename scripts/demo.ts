/**
 * Makes the demo pictures of our own textile shop into ./demo/images (or the folder given
 * as the first argument), printing each file and the time taken. Existing files are kept.
 */
import { stat } from 'node:fs/promises';
import { join, resolve } from 'node:path';
import { ensureDemoImages } from '../tools/demo/index.js';

const dir = resolve(process.argv[2] ?? 'demo/images');
const started = performance.now();
const paths = await ensureDemoImages(dir);
for (const path of paths) {
  const s = await stat(join(dir, path));
  console.log(`${path.padEnd(28)} ${(s.size / 1024).toFixed(0).padStart(6)} KiB`);
}
console.log(`${paths.length} pictures in ${dir} (${((performance.now() - started) / 1000).toFixed(1)} s)`);

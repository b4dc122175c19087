/**
 * `npm run risk-calibration`: the visibility model's targets (issue 12), measured in this run.
 * 1. Demo pictures at six widths: share rated low with the defaults; share where the legacy look
 *    (encoded light, Lanczos-3, no prefilter) is rated worse (larger margin) than the default.
 * 2. Natural photographs (python3-skimage): band energy 0.5x..0.9x Nyquist kept by prefilter=auto
 *    against prefilter=none.
 * 3. Gratings and step shrunk 4x (scripts/risk/figures.ts): kept amplitude near Nyquist and the
 *    worst-phase overshoot, beside the legacy look and the reference library's resizes.
 */
import { bandEnergy, demoRows, photoSource, PHOTOS, planFor, render } from './risk/cases.js';
import { figuresTable } from './risk/figures.js';

const rows = demoRows();
const pad = (s: string, n: number) => s.padEnd(n);
console.log('Demo renditions (defaults vs legacy look), margins in threshold units (1 = just visible):\n');
console.log(`| ${pad('picture', 22)} | width | default            | legacy             | strongest default pattern`);
let low = 0;
let worse = 0;
for (const r of rows) {
  if (r.ours.level === 'low') low++;
  if (r.legacy.margin > r.ours.margin) worse++;
  const top = r.ours.patterns.find((p) => p.kind !== 'clean');
  console.log(
    `| ${pad(r.path, 22)} | ${String(r.width).padStart(5)} | ${pad(`${r.ours.level} ${r.ours.margin.toFixed(2)}`, 18)} | ${pad(`${r.legacy.level} ${r.legacy.margin.toFixed(2)}`, 18)} | ${top?.description ?? '-'}`,
  );
}
const pct = (v: number) => `${((100 * v) / rows.length).toFixed(1)} %`;
console.log(`\nlow with the defaults: ${low}/${rows.length} = ${pct(low)} (target >= 90 %)`);
console.log(`legacy rated worse: ${worse}/${rows.length} = ${pct(worse)} (target >= 80 %)`);
const odd = rows.filter((r) => r.ours.level !== 'low');
for (const r of odd) console.log(`  not low: ${r.path} at ${r.width} px: ${r.ours.reason}`);

console.log('\nNatural photographs, band energy 0.5x..0.9x Nyquist kept by prefilter=auto (target >= 95 %):');
for (const name of PHOTOS) {
  const src = await photoSource(name);
  if (!src) {
    console.log(`  ${name}: absent (install Debian's python3-skimage)`);
    continue;
  }
  const kept: string[] = [];
  for (const width of [160, 320, 480]) {
    if (width >= src.raster.width) continue;
    const auto = bandEnergy(render(src, planFor(src, width, 'default')), 0.5, 0.9);
    const none = bandEnergy(render(src, planFor(src, width, { prefilter: 'none' })), 0.5, 0.9);
    kept.push(`${width} px ${((100 * auto) / none).toFixed(1)} %`);
  }
  console.log(`  ${pad(name, 20)} ${kept.join(', ')}`);
}

console.log(`\n${await figuresTable()}`);

import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { envMap } from '../../src/config.js';
import { errorCodes } from '../../src/errors.js';
import { kernelNames, renamedKernels } from '../../src/core/kernels/index.js';

// The README is the user's reference: every stable error code and every environment variable
// the service reads must be listed there, or a client cannot match on it.
const readme = readFileSync(new URL('../../README.md', import.meta.url), 'utf8');
const defaults = JSON.parse(readFileSync(new URL('../../config/default.json', import.meta.url), 'utf8')) as Record<string, unknown>;

/** The README table row of an environment variable, or undefined. */
function envRow(name: string): string | undefined {
  return readme.split('\n').find((line) => line.startsWith(`| \`${name}\` |`));
}

describe('README', () => {
  it.each(Object.entries(errorCodes))('lists %s with its status', (code, { status }) => {
    const rows = readme.split('\n').filter((line) => line.startsWith(`| \`${code}\` |`));
    expect(rows.length, `${code} missing from the README's error table`).toBeGreaterThan(0);
    expect(rows.some((line) => line.startsWith(`| \`${code}\` | ${status} |`))).toBe(true);
  });

  it('names the two commands a new user needs', () => {
    expect(readme).toContain('npm install && npm start');
    expect(readme).toContain('npm test');
  });

  // The list comes from the config's own map, so a variable added there and not here fails.
  it.each(Object.entries(envMap))('documents the environment variable %s with its setting and default', (name, { path }) => {
    const row = envRow(name);
    expect(row, `${name} missing from the README's environment table`).toMatch(new RegExp(`^\\| \`${name}\` \\| \`${path.join('.')}\``));
    const value = path.reduce<unknown>((at, key) => (at as Record<string, unknown> | undefined)?.[key], defaults);
    const shown = value === null || (Array.isArray(value) && value.length === 0) ? 'none' : `\`${String(value)}\``;
    expect(row!.split(' | ').at(-1), `${name}'s default`).toContain(shown);
  });

  it('documents FOLDWISE_CONFIG, which loadConfig reads before the map', () => {
    expect(envRow('FOLDWISE_CONFIG')).toContain('`config/default.json`');
  });

  // The kernel row and the old-spelling table come from the core's one kernel table.
  it('lists every kernel of the table, and every old spelling with its new name', () => {
    const row = envRow('kernel') ?? '';
    for (const name of kernelNames) expect(row, name).toContain(`\`${name}\``);
    for (const [old, now] of Object.entries(renamedKernels)) {
      expect(readme).toContain(`| \`kernel=${old}\` | \`kernel=${now}\` |`);
    }
    expect(readme).toContain('| `format=auto` | leave `format` out |');
  });
});

import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { errorCodes } from '../../src/errors.js';

// The README is the user's reference: every stable error code and every environment variable
// the service reads must be listed there, or a client cannot match on it.
const readme = readFileSync(new URL('../../README.md', import.meta.url), 'utf8');

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

  it.each(['HOST', 'PORT', 'FOLDWISE_SOURCE_DIR', 'FOLDWISE_REDIS_URL', 'FOLDWISE_SIGNING_KEY', 'FOLDWISE_CONFIG'])(
    'documents the environment variable %s',
    (name) => {
      expect(readme).toContain(`\`${name}\``);
    },
  );
});

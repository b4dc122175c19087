/**
 * Prints the README's error-code table from the one registry (src/errors.ts), so the two
 * cannot drift: `npx tsx scripts/readme-errors.ts`. test/docs/readme.test.ts checks the README.
 */
import { errorCodes } from '../src/errors.js';

const rows = Object.entries(errorCodes).map(([code, { status, title }]) => `| \`${code}\` | ${status} | ${title} |`);
process.stdout.write(['| code | status | title |', '|---|---|---|', ...rows].join('\n') + '\n');

import { configDefaults, defineConfig } from 'vitest/config';

/**
 * The unit project: the core and the modules that run in the test's own thread. A file belongs
 * here only if it builds no app (no Fastify), starts no worker thread, child process or
 * listening socket, and needs neither Redis nor a browser. Everything else, and any new file
 * not listed here, runs in the service project; `npm test` runs both.
 */
const unit = [
  'test/core/**/*.test.ts',
  'test/config.test.ts',
  'test/cache/{breaker,disk,memory,pack,tiered}.test.ts',
  'test/docs/readme.test.ts',
  'test/ingest/{jobs,ladder,store}.test.ts',
  'test/inspect/zoom.test.ts',
  'test/http/pages/accept.test.ts',
  'test/codec/{decode,decode-layouts,decode-refusals,encode,negotiate,spool-parity,webp-icc}.test.ts',
  'test/lib/single-flight.test.ts',
  'test/origins/{address-guard,folder}.test.ts',
  'test/pool/spool/rows.test.ts',
  'test/rendition/{identity,key,plan,timings}.test.ts',
  'test/risk/warnings.test.ts',
  'test/schemas/colour.test.ts',
  'test/security/signing.test.ts',
];

export default defineConfig({
  test: {
    // Inherited by both projects (extends: true): environment and timeouts.
    environment: 'node',
    // CI runs the suite on Node 20 on purpose; the AWS SDK's notice that its 2027 versions need
    // Node 22 is in the README's limits (the service itself leaves it on). Child processes inherit it.
    env: { AWS_SDK_JS_NODE_VERSION_SUPPORT_WARNING_DISABLED: 'true' },
    testTimeout: 60_000,
    hookTimeout: 60_000,
    // Two cores on CI: more parallel files only fight over them (a run-wide setting).
    maxWorkers: 2,
    reporters: ['default'],
    projects: [
      { extends: true, test: { name: 'unit', include: unit } },
      { extends: true, test: { name: 'service', include: ['test/**/*.test.ts'], exclude: [...configDefaults.exclude, ...unit] } },
    ],
  },
});

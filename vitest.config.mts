import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { defineConfig } from 'vitest/config';

const root = path.dirname(fileURLToPath(import.meta.url));

const alias = {
  '@': path.resolve(root),
  // Next's guard against client imports; inert outside the Next bundler.
  'server-only': path.resolve(root, 'tests/setup/server-only-stub.ts'),
};

/**
 * Three levels: unit (lib, no I/O beyond temp files), integration (route handlers
 * against a real SQLite file and the local fakes), browser (Chromium against the
 * built app that scripts/test.ts starts).
 */
export default defineConfig({
  resolve: { alias },
  test: {
    reporters: process.env.PARTWISE_TEST_REPORT ? ['default', ['json', { outputFile: process.env.PARTWISE_TEST_REPORT }]] : ['default'],
    projects: [
      {
        resolve: { alias },
        test: { name: 'unit', include: ['tests/unit/**/*.test.ts'], environment: 'node', testTimeout: 60_000 },
      },
      {
        resolve: { alias },
        test: {
          name: 'integration',
          include: ['tests/integration/**/*.test.ts'],
          environment: 'node',
          setupFiles: ['tests/setup/integration-db.ts'],
          testTimeout: 60_000,
          hookTimeout: 60_000,
        },
      },
      {
        resolve: { alias },
        test: {
          name: 'browser',
          include: ['tests/browser/**/*.test.ts'],
          environment: 'node',
          testTimeout: 120_000,
          hookTimeout: 120_000,
          // One Chromium at a time on a 2-core machine; journeys share the seeded server.
          fileParallelism: false,
        },
      },
    ],
  },
});

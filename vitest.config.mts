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
 * against a real SQLite file and the local fakes; integration-pg: the same on PostgreSQL), browser (Chromium against the
 * built app that scripts/test.ts starts); beside them, system tests that start, kill
 * and restart app server processes of their own (on the same build).
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
          // PostgreSQL's row locks; SQLite's file lock has locked-database.test.ts.
          exclude: ['tests/integration/foundation/locked-row.test.ts'],
          environment: 'node',
          globalSetup: ['tests/setup/redis-global.ts'],
          setupFiles: ['tests/setup/integration-db.ts'],
          testTimeout: 60_000,
          hookTimeout: 60_000,
        },
      },
      {
        resolve: { alias },
        test: {
          // The same route-handler tests on PostgreSQL: each file gets a database of its own,
          // copied from a template migrated once (tests/setup/postgres-global.ts).
          name: 'integration-pg',
          include: ['tests/integration/**/*.test.ts'],
          exclude: [
            // SQLite's own machinery, which PostgreSQL does not have: the online backup and
            // restore of the database file (on PostgreSQL db:backup defers to pg_dump), and a
            // second sqlite3 handle holding the file's write lock (PostgreSQL locks rows).
            'tests/integration/foundation/backup.test.ts',
            'tests/integration/foundation/locked-database.test.ts',
          ],
          environment: 'node',
          env: { PARTWISE_TEST_DIALECT: 'postgres' },
          globalSetup: ['tests/setup/postgres-global.ts', 'tests/setup/redis-global.ts'],
          setupFiles: ['tests/setup/integration-db.ts'],
          testTimeout: 60_000,
          hookTimeout: 60_000,
        },
      },
      {
        resolve: { alias },
        test: {
          // Whole server processes a test starts, kills and restarts on a database of its own.
          name: 'system',
          include: ['tests/system/**/*.test.ts'],
          environment: 'node',
          testTimeout: 180_000,
          hookTimeout: 180_000,
          fileParallelism: false,
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

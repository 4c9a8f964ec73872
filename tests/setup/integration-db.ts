import fs from 'node:fs';
import path from 'node:path';
import { randomUUID } from 'node:crypto';
import { inject } from 'vitest';

/**
 * Each integration test file gets its own freshly migrated database, set before any
 * model module loads (setup files run before the test file's imports): a SQLite file
 * in the `integration` project, a PostgreSQL database copied from the migrated template
 * (tests/setup/postgres-global.ts) in `integration-pg` (PARTWISE_TEST_DIALECT=postgres).
 */
process.env.NEXTAUTH_SECRET ??= 'integration-test-secret-not-for-production';
// Handlers are called directly with http://localhost:3000 requests (tests/helpers/auth.ts),
// whatever stack `npm test` started for the browser tests.
process.env.NEXTAUTH_URL = 'http://localhost:3000';

const { openSequelize } = await import('@/models/db');

if (process.env.PARTWISE_TEST_DIALECT === 'postgres') {
  const server = inject('pgServerUrl');
  const name = `it_${randomUUID().replace(/-/g, '')}`;
  const admin = openSequelize(`${server}postgres`);
  try {
    // Copies of one template can meet ("source database is being accessed"): try again shortly.
    for (let attempt = 1; ; attempt++) {
      try {
        await admin.query(`CREATE DATABASE ${name} TEMPLATE partwise_template`);
        break;
      } catch (e) {
        if (attempt >= 10 || !/being accessed by other users/.test((e as Error).message)) throw e;
        await new Promise((r) => setTimeout(r, 100 * attempt));
      }
    }
  } finally {
    await admin.close();
  }
  process.env.DATABASE_URL = `${server}${name}`;
} else {
  const dir = path.resolve('.tmp/integration');
  fs.mkdirSync(dir, { recursive: true });
  const file = path.join(dir, `${randomUUID()}.sqlite`);
  process.env.DATABASE_URL = file;
  const { createMigrator } = await import('@/lib/db/migrator');
  const migrationConnection = openSequelize(file);
  await createMigrator(migrationConnection).up();
  await migrationConnection.close();
}

import fs from 'node:fs';
import path from 'node:path';
import { randomUUID } from 'node:crypto';

/**
 * Each integration test file gets its own freshly migrated SQLite file, set before
 * any model module loads (setup files run before the test file's imports).
 */
const dir = path.resolve('.tmp/integration');
fs.mkdirSync(dir, { recursive: true });
const file = path.join(dir, `${randomUUID()}.sqlite`);
process.env.DATABASE_URL = file;
process.env.NEXTAUTH_SECRET ??= 'integration-test-secret-not-for-production';
// Handlers are called directly with http://localhost:3000 requests (tests/helpers/auth.ts),
// whatever stack `npm test` started for the browser tests.
process.env.NEXTAUTH_URL = 'http://localhost:3000';

const { openSequelize } = await import('@/models/db');
const { createMigrator } = await import('@/lib/db/migrator');
const migrationConnection = openSequelize(file);
await createMigrator(migrationConnection).up();
await migrationConnection.close();

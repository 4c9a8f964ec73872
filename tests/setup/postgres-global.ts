import type { TestProject } from 'vitest/node';
import { startPostgres, type RunningPostgres } from '../../scripts/lib/ensure-postgres';

/**
 * Global setup of the integration-pg project: a PostgreSQL server (the one `npm test`
 * started, named by PARTWISE_TEST_PG_URL, or a throwaway one of our own) and a template
 * database migrated once, which every test file's own database is copied from
 * (tests/setup/integration-db.ts): CREATE DATABASE … TEMPLATE copies files, far quicker
 * than migrating each one.
 */
export const TEMPLATE_DATABASE = 'partwise_template';

declare module 'vitest' {
  export interface ProvidedContext {
    pgServerUrl: string;
  }
}

let own: RunningPostgres | undefined;

/** The server's address without a database (…@host:port/). */
function serverUrl(): string {
  if (process.env.PARTWISE_TEST_PG_URL) return process.env.PARTWISE_TEST_PG_URL.replace(/\/+$/, '') + '/';
  own = startPostgres();
  return own.url('');
}

export default async function setup(project: TestProject) {
  const server = serverUrl();
  const { openSequelize } = await import('../../models/db');
  const { createMigrator } = await import('../../lib/db/migrator');
  const admin = openSequelize(`${server}postgres`);
  try {
    await admin.query(`DROP DATABASE IF EXISTS ${TEMPLATE_DATABASE}`);
    await admin.query(`CREATE DATABASE ${TEMPLATE_DATABASE}`);
  } finally {
    await admin.close();
  }
  const template = openSequelize(`${server}${TEMPLATE_DATABASE}`);
  try {
    await createMigrator(template).up();
  } finally {
    // No connection may stay open on a template while databases are copied from it.
    await template.close();
  }
  project.provide('pgServerUrl', server);
  return () => own?.stop();
}

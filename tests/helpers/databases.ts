import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { randomUUID } from 'node:crypto';
import { inject } from 'vitest';
import { openSequelize } from '@/models/db';

/**
 * An empty, unmigrated database of the integration project's dialect, for tests that
 * run migrations themselves: a new SQLite file, or a new PostgreSQL database on the
 * integration-pg project's server (PARTWISE_TEST_DIALECT=postgres).
 */
export async function emptyDatabase(): Promise<string> {
  if (process.env.PARTWISE_TEST_DIALECT !== 'postgres') {
    return path.join(fs.mkdtempSync(path.join(os.tmpdir(), 'partwise-empty-')), 'db.sqlite');
  }
  const server = inject('pgServerUrl');
  const name = `empty_${randomUUID().replace(/-/g, '')}`;
  const admin = openSequelize(`${server}postgres`);
  try {
    await admin.query(`CREATE DATABASE ${name}`);
  } finally {
    await admin.close();
  }
  return `${server}${name}`;
}

import fs from 'node:fs';
import path from 'node:path';
import sqlite3 from 'sqlite3';
import { BUSY_TIMEOUT_MS, describeDatabase } from '@/models/db';

/**
 * On PostgreSQL, backups are the server's business: pg_dump reads a consistent snapshot
 * while the app runs, pg_restore loads it, and both know roles, large tables and
 * compression better than a copy made here would. db:backup and db:restore print the
 * command to run (without the password: pg_dump reads PGPASSWORD or ~/.pgpass).
 */
const shellQuote = (s: string) => (/^[\w@%+=:,./-]+$/.test(s) ? s : `'${s.replace(/'/g, `'\\''`)}'`);

export function pgDumpCommand(url: string, destPath: string): string {
  return ['pg_dump', '--format=custom', `--file=${shellQuote(destPath)}`, shellQuote(describeDatabase(url))].join(' ');
}

export function pgRestoreCommand(url: string, sourcePath: string): string {
  return ['pg_restore', '--clean', '--if-exists', '--no-owner', `--dbname=${shellQuote(describeDatabase(url))}`, shellQuote(sourcePath)].join(' ');
}

/**
 * Online backup and restore of the SQLite file, safe while the server runs:
 * backup is `VACUUM INTO` (one consistent read snapshot, compacted); restore copies a
 * verified backup into the live file through SQLite's backup API, which takes the
 * proper locks so readers and writers of the live file just wait.
 */
function open(file: string, mode = sqlite3.OPEN_READWRITE): Promise<sqlite3.Database> {
  return new Promise((resolve, reject) => {
    const db = new sqlite3.Database(file, mode, (e) => (e ? reject(e) : resolve(db)));
  }).then((db) => {
    (db as sqlite3.Database).configure('busyTimeout', BUSY_TIMEOUT_MS);
    return db as sqlite3.Database;
  });
}

const all = <T>(db: sqlite3.Database, sql: string, params: unknown[] = []) =>
  new Promise<T[]>((resolve, reject) => db.all(sql, params, (e, rows) => (e ? reject(e) : resolve(rows as T[]))));
const close = (db: sqlite3.Database) => new Promise<void>((resolve, reject) => db.close((e) => (e ? reject(e) : resolve())));

export async function backupDatabase(livePath: string, destPath: string): Promise<{ file: string; bytes: number }> {
  if (fs.existsSync(destPath)) throw new Error(`${destPath} already exists; choose a new backup file name.`);
  fs.mkdirSync(path.dirname(destPath), { recursive: true });
  const db = await open(livePath);
  try {
    await all(db, 'VACUUM INTO ?', [destPath]);
  } finally {
    await close(db);
  }
  await verifyBackup(destPath);
  return { file: destPath, bytes: fs.statSync(destPath).size };
}

/** A restorable file: a SQLite database that passes its integrity check and has our schema. */
export async function verifyBackup(file: string): Promise<{ migrations: number }> {
  if (!fs.existsSync(file)) throw new Error(`${file} does not exist.`);
  const db = await open(file, sqlite3.OPEN_READONLY).catch(() => {
    throw new Error(`${file} is not a SQLite database.`);
  });
  try {
    const check = await all<{ integrity_check: string }>(db, 'PRAGMA integrity_check').catch(() => {
      throw new Error(`${file} is not a SQLite database.`);
    });
    if (check[0]?.integrity_check !== 'ok') throw new Error(`${file} failed its integrity check: ${check[0]?.integrity_check}`);
    const migrations = await all<{ n: number }>(db, 'SELECT COUNT(*) AS n FROM schema_migrations').catch(() => {
      throw new Error(`${file} is not a Partwise database (no schema_migrations table).`);
    });
    return { migrations: migrations[0].n };
  } finally {
    await close(db);
  }
}

interface SqliteBackup {
  step(pages: number, cb: (e: Error | null) => void): void;
  finish(cb: () => void): void;
  completed: boolean;
  failed: boolean;
}

export async function restoreDatabase(sourcePath: string, livePath: string): Promise<void> {
  await verifyBackup(sourcePath);
  fs.mkdirSync(path.dirname(livePath), { recursive: true });
  const live = await open(livePath, sqlite3.OPEN_READWRITE | sqlite3.OPEN_CREATE);
  try {
    await new Promise<void>((resolve, reject) => {
      // filenameIsDest = false: copy FROM the backup file INTO the live database.
      // The typings omit Database#backup; its shape is documented in node-sqlite3's lib/sqlite3.js.
      const backup: SqliteBackup = (live as unknown as { backup: (...a: unknown[]) => SqliteBackup }).backup(sourcePath, 'main', 'main', false, (e: Error | null) => {
        if (e) return reject(e);
        const step = () =>
          backup.step(-1, (err: Error | null) => {
            if (err) return reject(err);
            if (backup.completed) {
              backup.finish(() => resolve());
            } else if (backup.failed) {
              reject(new Error('the restore did not complete'));
            } else {
              setTimeout(step, 50);
            }
          });
        step();
      });
    });
  } finally {
    await close(live);
  }
}

/** Per table: row count and a checksum of every row, to compare two database files. */
export async function tableFingerprints(file: string): Promise<Record<string, { rows: number; checksum: string }>> {
  const { createHash } = await import('node:crypto');
  const db = await open(file, sqlite3.OPEN_READONLY);
  try {
    const tables = await all<{ name: string }>(db, "SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%' ORDER BY name");
    const out: Record<string, { rows: number; checksum: string }> = {};
    for (const { name } of tables) {
      const rows = await all<Record<string, unknown>>(db, `SELECT * FROM "${name}" ORDER BY rowid`);
      const hash = createHash('sha256');
      for (const row of rows) hash.update(JSON.stringify(row, (_k, v) => (Buffer.isBuffer(v) ? v.toString('base64') : v)));
      out[name] = { rows: rows.length, checksum: hash.digest('hex') };
    }
    return out;
  } finally {
    await close(db);
  }
}

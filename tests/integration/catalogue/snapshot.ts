import { createHash } from 'node:crypto';
import { QueryTypes } from 'sequelize';
import { flushUsage } from '@/lib/usage';
import { sequelize } from '@/models';

/**
 * Fingerprint of database tables: row count and a SHA-256 over every row's columns in
 * rowid order (SQLite) or first-column order (PostgreSQL, which has no rowid; every
 * table's first column is its key). Two equal fingerprints mean nothing was inserted,
 * changed or deleted.
 */
export type Fingerprint = Record<string, { rows: number; sha256: string }>;

const postgres = () => sequelize.getDialect() === 'postgres';

export async function tableNames(): Promise<string[]> {
  const sql = postgres()
    ? "SELECT table_name AS name FROM information_schema.tables WHERE table_schema = 'public' AND table_type = 'BASE TABLE' ORDER BY table_name"
    : "SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%' AND name <> 'SequelizeMeta' ORDER BY name";
  const rows = await sequelize.query<{ name: string }>(sql, { type: QueryTypes.SELECT });
  return rows.map((r) => r.name);
}

function cellText(v: unknown): string {
  if (v === null || v === undefined) return '\u0000null';
  if (Buffer.isBuffer(v)) return `\u0000blob:${createHash('sha256').update(v).digest('hex')}`;
  if (v instanceof Date) return v.toISOString();
  // PostgreSQL hands JSON columns back parsed.
  if (typeof v === 'object') return JSON.stringify(v);
  return String(v);
}

export async function fingerprint(tables?: string[]): Promise<Fingerprint> {
  // Answers counted in memory must be on disk before a snapshot, or they would show up as a change.
  await flushUsage();
  const out: Fingerprint = {};
  for (const table of tables ?? (await tableNames())) {
    const rows = await sequelize.query<Record<string, unknown>>(`SELECT * FROM "${table.replace(/"/g, '""')}" ORDER BY ${postgres() ? '1' : 'rowid'}`, { type: QueryTypes.SELECT });
    const hash = createHash('sha256');
    for (const row of rows) {
      for (const key of Object.keys(row).sort()) hash.update(`${key}=${cellText(row[key])}\u0001`);
      hash.update('\u0002');
    }
    out[table] = { rows: rows.length, sha256: hash.digest('hex') };
  }
  return out;
}

/** Tables whose fingerprint differs between two snapshots (empty when unchanged). */
export function changedTables(before: Fingerprint, after: Fingerprint): string[] {
  const names = new Set([...Object.keys(before), ...Object.keys(after)]);
  return [...names].filter((t) => before[t]?.rows !== after[t]?.rows || before[t]?.sha256 !== after[t]?.sha256).sort();
}

import path from 'node:path';
import fs from 'node:fs';
import { Sequelize, Transaction } from 'sequelize';

/**
 * The one database connection module. SQLite in WAL mode with a busy timeout, so
 * concurrent readers never block and writers wait instead of failing at once.
 *
 * DATABASE_URL accepts `sqlite:relative/or/absolute/path.sqlite`, `file:path`, or a
 * plain path. The same Sequelize models run on PostgreSQL when the URL says so.
 */
export const DEFAULT_DATABASE_PATH = 'data/partwise.sqlite';
export const BUSY_TIMEOUT_MS = Number(process.env.DB_BUSY_TIMEOUT_MS ?? 5000);

export function databasePath(url = process.env.DATABASE_URL): string {
  const raw = (url ?? '').trim() || DEFAULT_DATABASE_PATH;
  const stripped = raw.replace(/^sqlite:(\/\/)?/, '').replace(/^file:(\/\/)?/, '');
  return path.resolve(/*turbopackIgnore: true*/ process.cwd(), stripped);
}

interface SqliteHandle {
  configure(option: 'busyTimeout', ms: number): void;
  run(sql: string): void;
}
const configured = new WeakSet<object>();

function createSequelize(storage: string): Sequelize {
  if (storage !== ':memory:') {
    // An unwritable location surfaces later as a connection error, reported by /api/health.
    try {
      fs.mkdirSync(/*turbopackIgnore: true*/ path.dirname(storage), { recursive: true });
    } catch {}
  }
  const sequelize = new Sequelize({
    dialect: 'sqlite',
    storage,
    logging: process.env.DB_LOG === '1' ? console.log : false,
    define: { underscored: true, timestamps: true },
    // The busy timeout is the one wait; Sequelize's default five retries would stretch it fivefold.
    retry: { max: 1 },
    // Take the write lock when a transaction begins: a DEFERRED one that reads and then
    // writes fails at once with SQLITE_BUSY under WAL if another connection wrote in
    // between, and the busy timeout cannot help it. IMMEDIATE waits its turn instead.
    transactionType: Transaction.TYPES.IMMEDIATE,
  });
  // The sqlite dialect has no connect hook, and transactions open handles of their
  // own, so every handle gets the pragmas the moment the dialect hands it out.
  const manager = (sequelize as unknown as { connectionManager: { getConnection: (o?: unknown) => Promise<SqliteHandle> } }).connectionManager;
  const original = manager.getConnection.bind(manager);
  manager.getConnection = async (options?: unknown) => {
    const handle = await original(options);
    if (!configured.has(handle)) {
      configured.add(handle);
      handle.configure('busyTimeout', BUSY_TIMEOUT_MS);
      handle.run('PRAGMA journal_mode = WAL');
      handle.run('PRAGMA synchronous = NORMAL');
    }
    return handle;
  };
  return sequelize;
}

const globalCache = globalThis as unknown as { __partwiseSequelize?: Map<string, Sequelize> };

/** Connection for the configured database; cached per path (safe to lose). */
export function getSequelize(storage = databasePath()): Sequelize {
  globalCache.__partwiseSequelize ??= new Map();
  let s = globalCache.__partwiseSequelize.get(storage);
  if (!s) {
    s = createSequelize(storage);
    globalCache.__partwiseSequelize.set(storage, s);
  }
  return s;
}

/** A fresh, uncached connection (migration tests, backups, CLI tools). */
export function openSequelize(storage: string): Sequelize {
  return createSequelize(storage);
}

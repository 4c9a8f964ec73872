import path from 'node:path';
import { databaseDialect, databasePath } from '@/models/db';
import { pgRestoreCommand, restoreDatabase } from '@/lib/db/backup';

/** `npm run db:restore -- FILE`: replace the live database's content with a verified backup. */
async function main() {
  const source = process.argv[2];
  const location = databasePath();
  if (databaseDialect(location) === 'postgres') {
    console.error(`On PostgreSQL, db:restore defers to pg_restore (stop the app first); run: ${pgRestoreCommand(location, source ? path.resolve(source) : 'FILE.dump')}  (password from PGPASSWORD or ~/.pgpass)`);
    process.exit(2);
  }
  if (!source) {
    console.error('Usage: npm run db:restore -- FILE (a file written by npm run db:backup)');
    process.exit(2);
  }
  await restoreDatabase(path.resolve(source), location);
  console.log(`Restored ${location} from ${path.resolve(source)}.`);
}
main().catch((e) => {
  console.error(`Restore failed: ${(e as Error).message}`);
  process.exit(1);
});

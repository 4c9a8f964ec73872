import path from 'node:path';
import { databaseDialect, databasePath } from '@/models/db';
import { backupDatabase, pgDumpCommand } from '@/lib/db/backup';

/** `npm run db:backup [-- FILE]`: a consistent copy of the live database, server running or not. */
async function main() {
  const stamp = new Date().toISOString().replace(/[-:]/g, '').replace(/\..*/, '').replace('T', '-');
  const location = databasePath();
  if (databaseDialect(location) === 'postgres') {
    const dest = path.resolve(process.argv[2] ?? `data/backups/partwise-${stamp}.dump`);
    console.error(`On PostgreSQL, db:backup defers to pg_dump (a consistent snapshot while the app runs); run: ${pgDumpCommand(location, dest)}  (password from PGPASSWORD or ~/.pgpass)`);
    process.exit(2);
  }
  const dest = path.resolve(process.argv[2] ?? `data/backups/partwise-${stamp}.sqlite`);
  const { file, bytes } = await backupDatabase(location, dest);
  console.log(`Backed up ${location} to ${file} (${(bytes / 1024).toFixed(0)} KiB).`);
}
main().catch((e) => {
  console.error(`Backup failed: ${(e as Error).message}`);
  process.exit(1);
});

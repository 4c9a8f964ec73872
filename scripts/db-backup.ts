import path from 'node:path';
import { databasePath } from '@/models/db';
import { backupDatabase } from '@/lib/db/backup';

/** `npm run db:backup [-- FILE]`: a consistent copy of the live database, server running or not. */
async function main() {
  const stamp = new Date().toISOString().replace(/[-:]/g, '').replace(/\..*/, '').replace('T', '-');
  const dest = path.resolve(process.argv[2] ?? `data/backups/partwise-${stamp}.sqlite`);
  const { file, bytes } = await backupDatabase(databasePath(), dest);
  console.log(`Backed up ${databasePath()} to ${file} (${(bytes / 1024).toFixed(0)} KiB).`);
}
main().catch((e) => {
  console.error(`Backup failed: ${(e as Error).message}`);
  process.exit(1);
});

import path from 'node:path';
import { databasePath } from '@/models/db';
import { restoreDatabase } from '@/lib/db/backup';

/** `npm run db:restore -- FILE`: replace the live database's content with a verified backup. */
async function main() {
  const source = process.argv[2];
  if (!source) {
    console.error('Usage: npm run db:restore -- FILE (a file written by npm run db:backup)');
    process.exit(2);
  }
  await restoreDatabase(path.resolve(source), databasePath());
  console.log(`Restored ${databasePath()} from ${path.resolve(source)}.`);
}
main().catch((e) => {
  console.error(`Restore failed: ${(e as Error).message}`);
  process.exit(1);
});

import { openSequelize, databasePath, describeDatabase } from '@/models/db';
import { createMigrator } from '@/lib/db/migrator';

/** `npm run db:migrate | db:rollback | db:status` — the CLI face of the one runner. */
async function main() {
  const command = process.argv[2] ?? 'up';
  const file = databasePath();
  const shown = describeDatabase(file);
  const sequelize = openSequelize(file);
  const migrator = createMigrator(sequelize, undefined, false);
  try {
    if (command === 'up') {
      const done = await migrator.up();
      console.log(`${shown}: applied ${done.length} migration(s).`);
    } else if (command === 'down') {
      const step = process.argv.includes('--all') ? { to: 0 as const } : { step: 1 };
      const undone = await migrator.down(step);
      console.log(`${shown}: reverted ${undone.map((m) => m.name).join(', ') || 'nothing'}.`);
    } else if (command === 'status') {
      const executed = await migrator.executed();
      const pending = await migrator.pending();
      for (const m of executed) console.log(`applied  ${m.name}`);
      for (const m of pending) console.log(`pending  ${m.name}`);
    } else {
      console.error(`Unknown migrate command "${command}" (use up, down or status).`);
      process.exitCode = 2;
    }
  } catch (e) {
    console.error(`Migration failed on ${shown}: ${(e as Error).message}`);
    process.exitCode = 1;
  } finally {
    await sequelize.close();
  }
}
main().catch((e) => {
  // A refused DATABASE_URL (or another setup error) is one line, not a stack.
  console.error((e as Error).message);
  process.exit(2);
});

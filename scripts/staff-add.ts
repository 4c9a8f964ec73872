import { ZodError } from 'zod';

/**
 * `npm run staff:add -- email [--password P] [--name "Full Name"]`: create a Partwise
 * support account (the only way staff accounts come to be). Without --password a
 * random one is generated and printed once. Running it again for a staff address
 * sets a new password.
 */
function arg(name: string): string | undefined {
  const i = process.argv.indexOf(`--${name}`);
  return i >= 0 ? process.argv[i + 1] : undefined;
}

async function main() {
  const positional = process.argv.slice(2).filter((a, i, all) => !a.startsWith('--') && !all[i - 1]?.startsWith('--'));
  const email = positional[0];
  if (!email) {
    console.error('usage: npm run staff:add -- email@example.org [--password P] [--name "Full Name"]');
    process.exit(2);
  }
  const { sequelize } = await import('@/models');
  const { addStaff } = await import('@/lib/accounts/staff');
  const { createMigrator } = await import('@/lib/db/migrator');
  try {
    // The database may be brand new; bring it up to date first, as `npm start` would.
    await createMigrator(sequelize).up();
    const given = arg('password');
    const { user, password, created } = await addStaff(email, { password: given, name: arg('name') });
    console.log(`${created ? 'Created' : 'Updated'} staff account ${user.email} (id ${user.id}).`);
    if (!given) console.log(`Password: ${password}\nStore it now; it is not shown again.`);
  } catch (e) {
    const message = e instanceof ZodError ? e.issues.map((i) => i.message).join(' ') : (e as Error).message;
    console.error(`staff:add failed: ${message}`);
    process.exitCode = 1;
  } finally {
    await sequelize.close();
  }
}

main();

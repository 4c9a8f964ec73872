import fs from 'node:fs';
import path from 'node:path';
import { openSequelize, databasePath, describeDatabase, UnsupportedDatabaseUrl } from '@/models/db';
import { createMigrator } from '@/lib/db/migrator';
import { buildIsStale } from './lib/build-state';
import { spawnAppServer } from './lib/app-process';
import { run } from './lib/run';
import { startServices, stopServices } from './services';
import { seedDemo } from './seed';

/**
 * `npm start`: migrate (refusing to serve if that fails), seed the demo once, start
 * the local service fakes, build when sources changed, then serve on PORT.
 */
async function main() {
  const dev = process.argv.includes('--dev');
  const port = process.env.PORT ?? '3000';
  const appUrl = process.env.NEXTAUTH_URL ?? `http://localhost:${port}`;
  const dataDir = path.resolve(process.env.PARTWISE_DATA_DIR ?? 'data');
  fs.mkdirSync(dataDir, { recursive: true });

  let file: string;
  try {
    file = databasePath();
  } catch (e) {
    if (!(e instanceof UnsupportedDatabaseUrl)) throw e;
    console.error(`[partwise] Refusing to start: ${e.message}`);
    process.exit(2);
  }
  const sequelize = openSequelize(file);
  try {
    const applied = await createMigrator(sequelize).up();
    const pending = await createMigrator(sequelize).pending();
    if (pending.length) throw new Error(`still pending: ${pending.map((m) => m.name).join(', ')}`);
    console.log(`[partwise] database ${describeDatabase(file)}: ${applied.length} migration(s) applied, schema up to date.`);
  } catch (e) {
    console.error(`[partwise] Refusing to start: the database at ${describeDatabase(file)} could not be migrated (${(e as Error).message}).`);
    console.error('[partwise] Fix the cause, or run `npm run db:status` to see which migration is stuck.');
    process.exit(1);
  } finally {
    await sequelize.close();
  }

  // A deployment (a real signing secret) gets no demo accounts, whose passwords are in the
  // README, and no payment fake that accepts test cards, unless asked for by name.
  const deployment = !!(process.env.NEXTAUTH_SECRET ?? process.env.AUTH_SECRET);
  const seed = deployment ? process.env.PARTWISE_SEED_DEMO === '1' : process.env.PARTWISE_SKIP_SEED !== '1';
  if (deployment) {
    process.env.PAYMENTS_FAKE ??= '0';
    console.log(`[partwise] deployment start (NEXTAUTH_SECRET is set): demo seed ${seed ? 'ON (PARTWISE_SEED_DEMO=1)' : 'off'}, payment fake ${process.env.PAYMENTS_FAKE === '0' ? 'off' : 'ON (PAYMENTS_FAKE=1)'}, mail ${process.env.SMTP_HOST ? `to ${process.env.SMTP_HOST}` : 'to the local sink only (set SMTP_HOST)'}.`);
  }
  if (seed) await seedDemo();

  const services = await startServices({ dataDir, appUrl });
  const env: NodeJS.ProcessEnv = { ...process.env, NEXT_TELEMETRY_DISABLED: '1', NEXTAUTH_URL: appUrl, PORT: port, PARTWISE_DATA_DIR: dataDir };
  for (const s of services) Object.assign(env, s.env);
  if (!env.NEXTAUTH_SECRET && !env.AUTH_SECRET) {
    // A local demo run: the app server signs sessions with a random secret it keeps in the data directory.
    env.PARTWISE_LOCAL = '1';
    console.warn(`[partwise] NEXTAUTH_SECRET is not set: this is a local run (sessions signed with the random secret in ${path.join(dataDir, 'session-secret')}, demo mail page on). Set NEXTAUTH_SECRET for any real deployment.`);
  }

  if (!dev && (buildIsStale() || process.env.PARTWISE_FORCE_BUILD === '1')) {
    console.log('[partwise] building the app (sources changed since the last build)…');
    await run('npm', ['run', 'build'], { env });
  }

  const next = spawnAppServer({ port, host: process.env.HOST ?? '127.0.0.1', dev, stdio: 'inherit', env });
  console.log(`[partwise] serving at ${appUrl}`);
  // The server writes its last usage counts before it exits; the exit handler below then stops the fakes.
  const shutdown = () => {
    next.kill('SIGTERM');
  };
  process.on('SIGINT', shutdown);
  process.on('SIGTERM', shutdown);
  next.on('exit', async (code) => {
    await stopServices(services);
    process.exit(code ?? 0);
  });
}

main().catch((e) => {
  console.error('[partwise] start failed:', e);
  process.exit(1);
});

import fs from 'node:fs';
import path from 'node:path';
import { spawn } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import { buildIsStale } from './lib/build-state';
import { ensureChromium } from './lib/ensure-chromium';
import { ensurePostgresBinaries, startPostgres, testPostgresPort, type RunningPostgres } from './lib/ensure-postgres';
import { ensureRedisServer, startRedis, testRedisPort, type RunningRedis } from './lib/ensure-redis';
import { spawnAppServer } from './lib/app-process';
import { run, waitForHttp } from './lib/run';
import { startServices, stopServices, type RunningService } from './services';

/**
 * `npm test`: every level in one run. Builds the app when sources changed, starts a
 * test stack (fresh migrated and seeded SQLite file, the local fakes, the built app
 * on a spare port, and a throwaway PostgreSQL for the integration-pg project, which
 * runs the integration tests a second time on PostgreSQL, and a throwaway Redis), runs vitest's projects
 * against it, and stops everything. Extra arguments go to vitest (e.g. `npm test -- tests/unit`).
 */
const PORT = process.env.PARTWISE_TEST_PORT ?? '3210';
const ROOT = process.cwd();
const STACK_DIR = path.resolve(`.tmp/test-stack-${PORT}`);

async function main() {
  ensureChromium();
  ensurePostgresBinaries();
  ensureRedisServer();
  if (buildIsStale()) {
    console.log('[test] building the app…');
    await run('npm', ['run', 'build']);
  }

  fs.rmSync(STACK_DIR, { recursive: true, force: true });
  fs.mkdirSync(STACK_DIR, { recursive: true });
  const appUrl = `http://localhost:${PORT}`;
  const env: NodeJS.ProcessEnv = {
    ...process.env,
    NODE_ENV: 'production',
    NEXT_TELEMETRY_DISABLED: '1',
    DATABASE_URL: path.join(STACK_DIR, 'partwise.sqlite'),
    PARTWISE_DATA_DIR: STACK_DIR,
    NEXTAUTH_URL: appUrl,
    // A fresh random secret per run: the stack runs as a deployment, which refuses published secrets.
    NEXTAUTH_SECRET: process.env.NEXTAUTH_SECRET || randomBytes(32).toString('base64url'),
    // The local mail page (/dev/mail) lists what the SMTP fake received.
    PARTWISE_DEV_MAIL: '1',
    PORT,
  };

  // For the stack's server only (the integration tests read the real limits from this
  // process's environment): every browser journey answers the demo's free calculator from
  // one address, and its fair-use windows (10 answers a minute, 30 per address in 30 s)
  // are fixed windows, so the suite would otherwise wait out minutes in turn. Five times
  // the burst windows and a wider address limit; the real numbers are pinned by the
  // integration and system tests, and tests/browser/scoring-alerts.test.ts reads the scale.
  const serverLimits = { PARTWISE_SCORE_BURST_SCALE: '5', PARTWISE_SCORE_ADDRESS_BURST: '1000' };

  await run('npx', ['tsx', 'scripts/migrate.ts', 'up'], { env, stdio: ['ignore', 'ignore', 'inherit'] });
  await run('npx', ['tsx', 'scripts/seed.ts'], { env });

  let services: RunningService[] = [];
  let server: ReturnType<typeof spawnAppServer> | undefined;
  let postgres: RunningPostgres | undefined;
  let redis: RunningRedis | undefined;
  let exitCode = 1;
  try {
    Object.assign(process.env, env);
    // Its own port and data directory (.tmp/pg-PORT); each integration-pg file gets a database on it.
    if (!process.env.PARTWISE_TEST_PG_URL) {
      postgres = startPostgres(testPostgresPort(PORT));
      env.PARTWISE_TEST_PG_URL = postgres.url('');
    }
    // A throwaway redis-server (no persistence) for the tests of shared limits and invalidation.
    if (!process.env.PARTWISE_TEST_REDIS_URL) {
      redis = await startRedis(testRedisPort(PORT));
      env.PARTWISE_TEST_REDIS_URL = redis.url;
    }
    services = await startServices({ dataDir: STACK_DIR, appUrl });
    for (const s of services) Object.assign(env, s.env);

    const log = fs.openSync(path.join(STACK_DIR, 'server.log'), 'a');
    server = spawnAppServer({ port: PORT, env: { ...env, ...serverLimits }, stdio: ['ignore', log, log], detached: true });
    await waitForHttp(`${appUrl}/api/health`, 90_000, server);

    const report = path.join(STACK_DIR, 'vitest-report.json');
    exitCode = await new Promise<number>((resolve) => {
      const vitest = spawn('npx', ['--no-install', 'vitest', 'run', ...process.argv.slice(2)], {
        stdio: 'inherit',
        env: { ...env, NODE_ENV: 'test', PARTWISE_BASE_URL: appUrl, PARTWISE_TEST_REPORT: report, PARTWISE_TEST_SERVER_BURST_SCALE: serverLimits.PARTWISE_SCORE_BURST_SCALE },
      });
      vitest.on('exit', (code) => resolve(code ?? 1));
    });
    printSummary(report);
  } catch (e) {
    console.error('[test] the test stack failed:', (e as Error).message);
    const logFile = path.join(STACK_DIR, 'server.log');
    if (fs.existsSync(logFile)) console.error(fs.readFileSync(logFile, 'utf8').slice(-4000));
  } finally {
    if (server?.pid) {
      try {
        process.kill(-server.pid, 'SIGTERM');
      } catch {}
    }
    await stopServices(services);
    postgres?.stop();
    redis?.stop();
  }
  process.exit(exitCode);
}

/** The plain closing line CI reads, from vitest's JSON report. */
function printSummary(file: string) {
  if (!fs.existsSync(file)) return;
  const r = JSON.parse(fs.readFileSync(file, 'utf8')) as { numPassedTests: number; numFailedTests: number; numPendingTests: number; numTodoTests: number };
  console.log(`\ntests: ${r.numPassedTests} passed, ${r.numFailedTests} failed, ${r.numPendingTests + r.numTodoTests} skipped`);
}

process.chdir(ROOT);
main().catch((e) => {
  console.error(e);
  process.exit(1);
});

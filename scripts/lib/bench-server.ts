import fs from 'node:fs';
import path from 'node:path';
import { randomBytes } from 'node:crypto';
import type { ChildProcess } from 'node:child_process';
import { buildIsStale } from './build-state';
import { spawnAppServer } from './app-process';
import { run, waitForHttp } from './run';

/**
 * What the benchmarks that drive a production app server share: building when stale, a
 * fresh working folder, the server's environment with the visitor limits lifted, the
 * bench workspace (seeded demo, or one published calculator) on the Lab plan, and
 * starting and stopping servers as process groups.
 */

/** A visitor's answer to the demo's ride calculator. */
export const BENCH_VALUES = { avg_speed_kmh: 24.5, weekly_distance_km: 130, climb_per_ride_m: 420 };
export const BENCH_FEATURES = Object.keys(BENCH_VALUES);

/** Build into `dist` (NEXT_DIST_DIR) when any source is newer than the last build there. */
export async function ensureBuilt(dist: string, label: string): Promise<void> {
  process.env.NEXT_DIST_DIR = dist;
  if (!buildIsStale()) return;
  console.log(`[${label}] building into ${dist}…`);
  await run('npm', ['run', 'build'], { env: { ...process.env, NEXT_DIST_DIR: dist, NEXT_TELEMETRY_DISABLED: '1' } });
}

/** An empty folder for the run's database, secret and logs. */
export function freshDir(dir: string): string {
  fs.rmSync(dir, { recursive: true, force: true });
  fs.mkdirSync(dir, { recursive: true });
  return dir;
}

/**
 * The production server's environment for a benchmark. One loopback load generator
 * stands for many visitors, so the per-address, per-calculator and burst limits are
 * lifted: the benchmark measures the server, not the fair-use rules.
 */
export function benchAppEnv(opts: { dist: string; dir: string; url: string; databaseUrl?: string; extra?: Record<string, string> }): NodeJS.ProcessEnv {
  return {
    ...process.env,
    NODE_ENV: 'production',
    NEXT_DIST_DIR: opts.dist,
    NEXT_TELEMETRY_DISABLED: '1',
    DATABASE_URL: opts.databaseUrl ?? path.join(opts.dir, 'bench.sqlite'),
    PARTWISE_DATA_DIR: opts.dir,
    NEXTAUTH_URL: opts.url,
    NEXTAUTH_SECRET: randomBytes(32).toString('base64url'),
    PARTWISE_SCORE_ADDRESS_BURST: '1000000000',
    PARTWISE_SCORE_TOKEN_BURST: '1000000000',
    PARTWISE_SCORE_BURST_SCALE: '1000000',
    ...opts.extra,
  };
}

async function migrate(env: NodeJS.ProcessEnv): Promise<void> {
  await run('npx', ['tsx', 'scripts/migrate.ts', 'up'], { env, stdio: ['ignore', 'ignore', 'inherit'] });
  Object.assign(process.env, env);
}

export interface SeededDemo {
  token: string;
  embedId: number;
  datasetId: number;
  features: string[];
  /** A session cookie of the demo's analyst, for the studio's fit routes. */
  cookie: string;
}

/** Migrate, seed the demo, and move its workspace to the Lab plan (the largest allowance). */
export async function seedDemoOnLab(env: NodeJS.ProcessEnv): Promise<SeededDemo> {
  await migrate(env);
  await run('npx', ['tsx', 'scripts/seed.ts'], { env, stdio: ['ignore', 'ignore', 'inherit'] });
  const m = await import('@/models');
  const { DEMO_USERS } = await import('@/lib/demo/accounts');
  const { sessionCookie } = await import('../../tests/helpers/auth');
  const embed = await m.Embed.findOne({ where: { status: 'active' }, order: [['id', 'ASC']] });
  if (!embed) throw new Error('the seed published no calculator');
  await m.Subscription.update({ plan: 'lab' }, { where: { workspaceId: embed.workspaceId } });
  const dataset = await m.Dataset.findOne({ where: { workspaceId: embed.workspaceId }, order: [['id', 'ASC']] });
  if (!dataset) throw new Error('the seed stored no dataset');
  const analyst = await m.User.findOne({ where: { email: DEMO_USERS.member.email } });
  const features = dataset.columns.filter((c) => c.kind === 'numeric').map((c) => c.name).slice(0, 3);
  const seeded = { token: embed.token, embedId: embed.id, datasetId: dataset.id, features, cookie: await sessionCookie(analyst!.id, embed.workspaceId) };
  await m.sequelize.close();
  return seeded;
}

export interface BenchCalculator {
  token: string;
  embedId: number;
  /** The engine's model as stored (for benchmarks that also time the engine alone). */
  model: Record<string, unknown>;
  /** A key with the given scopes, when asked for. */
  apiKey: string | null;
}

/**
 * Migrate and publish one calculator in a workspace of its own on the Lab plan: four
 * groups, full covariances, the ride calculator's three fields, fitted on the demo's rides.
 */
export async function publishBenchCalculator(env: NodeJS.ProcessEnv, opts: { title: string; keyScopes?: ('read' | 'fit' | 'publish' | 'score')[] }): Promise<BenchCalculator> {
  await migrate(env);
  const m = await import('@/models');
  const { buildModel, parseNumericTable, selectMixture, toModelJson } = await import('@/lib/mixture');
  const { demoRidesCsv } = await import('@/lib/demo/cycling');
  const { publishNew } = await import('@/lib/embeds/service');
  const { createApiKey } = await import('@/lib/auth/api-keys');
  const owner = await m.User.create({ email: 'bench@partwise.test', name: 'Bench', passwordHash: 'x', emailVerifiedAt: new Date() });
  const workspace = await m.Workspace.create({ name: 'Bench', slug: 'bench' });
  await m.Membership.create({ userId: owner.id, workspaceId: workspace.id, role: 'owner' });
  await m.Subscription.create({ workspaceId: workspace.id, plan: 'lab', status: 'active' });
  const table = parseNumericTable(demoRidesCsv(5), BENCH_FEATURES);
  const selection = selectMixture(table.rows, table.n, table.d, { components: [4], covariances: ['full'], seed: 1 });
  const engine = buildModel(table.rows, table.n, table.d, selection.best, { features: BENCH_FEATURES.map((name) => ({ name })) });
  const modelJson = JSON.parse(toModelJson(engine)) as Record<string, unknown>;
  const model = await m.MixtureModel.create({
    workspaceId: workspace.id,
    createdById: owner.id,
    name: 'Ride groups',
    model: modelJson,
    clusters: ['Easy social', 'Steady club', 'Hill lovers', 'Fast group'].map((label, i) => ({ label, description: `Group ${i + 1} of the club.`, color: ['#3a8a74', '#e0a526', '#b8432f', '#4a5366'][i] })),
    fields: [
      { feature: 'avg_speed_kmh', label: 'Average speed', unit: 'km/h', min: 10, max: 45, help: '' },
      { feature: 'weekly_distance_km', label: 'Weekly distance', unit: 'km', min: 0, max: 500, help: '' },
      { feature: 'climb_per_ride_m', label: 'Climbing per ride', unit: 'm', min: 0, max: 3000, help: '' },
    ],
    caution: 'Benchmark calculator.',
  });
  const { embed } = await publishNew({ user: owner, workspace }, { mixtureModelId: model.id, title: opts.title });
  const apiKey = opts.keyScopes ? (await createApiKey({ user: owner, isStaff: false, workspace, role: 'owner' }, { name: 'Bench', scopes: opts.keyScopes })).secret : null;
  await m.sequelize.close();
  return { token: embed.token, embedId: embed.id, model: modelJson, apiKey };
}

/** Start the production server on `port` (its output in DIR/server-PORT.log) and wait for its health route. */
export async function startBenchServer(port: number, env: NodeJS.ProcessEnv, dir: string): Promise<ChildProcess> {
  const log = fs.openSync(path.join(dir, `server-${port}.log`), 'a');
  const server = spawnAppServer({ port, env: { ...env, PORT: String(port) }, stdio: ['ignore', log, log], detached: true });
  try {
    await waitForHttp(`http://127.0.0.1:${port}/api/health`, 90_000, server);
  } catch (error) {
    stopGroup(server);
    throw error;
  }
  return server;
}

/** SIGTERM to a process group started detached (a server or a worker with its children). */
export function stopGroup(child: ChildProcess | undefined): void {
  if (!child?.pid) return;
  try {
    process.kill(-child.pid, 'SIGTERM');
  } catch {
    // already gone
  }
}

/** Run a benchmark's main and exit with its code (0 when it returns none), or 1 with the error. */
export function runBench(main: () => Promise<number | void>, label: string): void {
  main().then(
    (code) => process.exit(code ?? 0),
    (e) => {
      console.error(`[${label}] failed:`, e);
      process.exit(1);
    },
  );
}

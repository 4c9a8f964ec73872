import fs from 'node:fs';
import path from 'node:path';
import { run } from './lib/run';
import { arg } from './lib/args';

/**
 * Plan-limit burst benchmark: `npx tsx scripts/bench-limits.ts [--burst 20] [--rounds 5]`
 *
 * On a fresh SQLite file, each round fires `burst` concurrent publishes on a workspace of
 * the free plan (one calculator; the round's first retires the last one, so exactly one
 * of each burst may publish) while a writer of another workspace renames its calculator
 * in a loop. Prints how long the write lock was held per turn (longest, mean), how long
 * writers waited for it, how long the other workspace's renames took during the bursts,
 * and the statuses seen. Figures only; correctness is tested in
 * tests/integration/security/limits-race.test.ts.
 */
const BURST = Number(arg('burst', '20'));
const ROUNDS = Number(arg('rounds', '5'));
const DIR = path.resolve('.tmp/bench-limits');

async function main() {
  fs.rmSync(DIR, { recursive: true, force: true });
  fs.mkdirSync(DIR, { recursive: true });
  const env = { ...process.env, DATABASE_URL: path.join(DIR, 'partwise.sqlite'), NEXTAUTH_SECRET: 'bench-limits-secret' };
  await run('npx', ['tsx', 'scripts/migrate.ts', 'up'], { env, stdio: ['ignore', 'ignore', 'inherit'] });
  Object.assign(process.env, env);

  const m = await import('@/models');
  const { resetWriteLockStats, writeLockStats } = await import('@/models/db');
  const { buildModel, parseNumericTable, selectMixture, toModelJson } = await import('@/lib/mixture');
  const { demoRidesCsv } = await import('@/lib/demo/cycling');
  const { publishNew, retireEmbed, updateSettings } = await import('@/lib/embeds/service');
  const { AppError } = await import('@/lib/errors');

  const features = ['avg_speed_kmh', 'weekly_distance_km', 'climb_per_ride_m'];
  const table = parseNumericTable(demoRidesCsv(5), features);
  const selection = selectMixture(table.rows, table.n, table.d, { components: [4], covariances: ['full'], seed: 1 });
  const engine = buildModel(table.rows, table.n, table.d, selection.best, { features: features.map((name) => ({ name })) });

  async function workspace(slug: string, plan: string) {
    const owner = await m.User.create({ email: `${slug}@bench.test`, name: slug, passwordHash: 'x', emailVerifiedAt: new Date() });
    const ws = await m.Workspace.create({ name: slug, slug });
    await m.Membership.create({ userId: owner.id, workspaceId: ws.id, role: 'owner' });
    await m.Subscription.create({ workspaceId: ws.id, plan, status: 'active' });
    const model = await m.MixtureModel.create({
      workspaceId: ws.id,
      createdById: owner.id,
      name: 'Ride groups',
      model: JSON.parse(toModelJson(engine)),
      clusters: ['Easy social', 'Steady club', 'Hill lovers', 'Fast group'].map((label, i) => ({ label, description: `Group ${i + 1}.`, color: ['#3a8a74', '#e0a526', '#b8432f', '#4a5366'][i] })),
      fields: [
        { feature: 'avg_speed_kmh', label: 'Average speed', unit: 'km/h', min: 10, max: 45, help: '' },
        { feature: 'weekly_distance_km', label: 'Weekly distance', unit: 'km', min: 0, max: 500, help: '' },
        { feature: 'climb_per_ride_m', label: 'Climbing per ride', unit: 'm', min: 0, max: 3000, help: '' },
      ],
      caution: '',
    });
    return { acting: { user: { id: owner.id, email: owner.email }, workspace: { id: ws.id } }, model };
  }

  const small = await workspace('sketch-burst', 'sketch');
  const other = await workspace('lab-writer', 'lab');
  const theirs = await publishNew(other.acting, { mixtureModelId: other.model.id, title: 'Theirs' });

  const statuses: Record<string, number> = {};
  const renameMs: number[] = [];
  const roundMs: number[] = [];
  resetWriteLockStats();
  for (let round = 0; round < ROUNDS; round++) {
    const live = await m.Embed.findOne({ where: { workspaceId: small.acting.workspace.id, status: 'active' } });
    if (live) await retireEmbed(small.acting, live.id);
    let bursting = true;
    const renames = (async () => {
      for (let i = 0; bursting; i++) {
        const t = performance.now();
        await updateSettings(other.acting, theirs.embed.id, { title: `Theirs ${round}.${i}` });
        renameMs.push(performance.now() - t);
      }
    })();
    const started = performance.now();
    const outcomes = await Promise.all(
      Array.from({ length: BURST }, () =>
        publishNew(small.acting, { mixtureModelId: small.model.id, title: 'Burst' }).then(
          () => '201',
          (e) => (e instanceof AppError ? String(e.status) : `error: ${(e as Error).message}`),
        ),
      ),
    );
    roundMs.push(performance.now() - started);
    bursting = false;
    await renames;
    for (const o of outcomes) statuses[o] = (statuses[o] ?? 0) + 1;
  }
  const stats = writeLockStats();
  const sorted = [...renameMs].sort((a, b) => a - b);
  const pct = (p: number) => sorted[Math.min(sorted.length - 1, Math.floor((sorted.length * p) / 100))] ?? 0;
  const f = (ms: number) => `${ms.toFixed(1)} ms`;
  console.log(`bench:limits — ${ROUNDS} rounds of ${BURST} concurrent publishes on a one-calculator plan`);
  console.log(`  outcomes: ${Object.entries(statuses).map(([s, n]) => `${s} × ${n}`).join(', ')} (expected 201 × ${ROUNDS}, 402 × ${ROUNDS * (BURST - 1)})`);
  console.log(`  burst wall time: mean ${f(roundMs.reduce((a, b) => a + b, 0) / roundMs.length)}, longest ${f(Math.max(...roundMs))}`);
  console.log(`  write-lock turns: ${stats.turns}; held longest ${f(stats.longestHoldMs)}, mean ${f(stats.totalHoldMs / Math.max(1, stats.turns))}; longest wait for a turn ${f(stats.longestWaitMs)}`);
  console.log(`  other workspace's renames during bursts: ${renameMs.length}; median ${f(pct(50))}, p95 ${f(pct(95))}, longest ${f(sorted[sorted.length - 1] ?? 0)}`);
  await m.sequelize.close();
}

main().catch((e) => {
  console.error(e);
  process.exit(1);
});

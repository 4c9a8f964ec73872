/**
 * npm run bench:fit-queue [-- --heavy 1 --rows 4000]
 *
 * How long another workspace waits for a fitting slot. On a fresh SQLite file under
 * .tmp, workspace A (the Lab plan) queues `--heavy` large fits of an invented ride
 * table; once A's first fit is running, workspace B queues one tiny fit. Prints the
 * time from B's request until its fit started and until it finished, and how far A's
 * fits had got, then cancels everything. Uses the job runner in this process (the same
 * code `npm start` runs), with the slot and slice settings of the environment.
 */
import fs from 'node:fs';
import path from 'node:path';
import { parseArgs } from 'node:util';

const { values: o } = parseArgs({
  options: {
    heavy: { type: 'string', default: '1' },
    rows: { type: 'string', default: '4000' },
    timeout: { type: 'string', default: '300' },
  },
});
const HEAVY = Number(o.heavy);
const ROWS = Number(o.rows);
const TIMEOUT_MS = Number(o.timeout) * 1000;

const dir = path.resolve('.tmp/bench-fit-queue');
fs.mkdirSync(dir, { recursive: true });
const file = path.join(dir, `${Date.now()}.sqlite`);
process.env.DATABASE_URL = file;

/** Weekly rides of an invented club: speed, distance and climbing in four loose groups. */
function ridesCsv(rows: number): string {
  const lines = ['avg_speed_kmh,weekly_distance_km,climb_per_ride_m'];
  for (let i = 0; i < rows; i++) {
    const g = i % 4;
    lines.push([18 + g * 3 + Math.sin(i) * 2, 40 + g * 35 + Math.cos(i * 1.7) * 15, 150 + g * 120 + Math.sin(i * 0.37) * 80].map((v) => v.toFixed(2)).join(','));
  }
  return lines.join('\n') + '\n';
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

async function main() {
  const { openSequelize } = await import('@/models/db');
  const { createMigrator } = await import('@/lib/db/migrator');
  const migration = openSequelize(file);
  await createMigrator(migration).up();
  await migration.close();

  const m = await import('@/models');
  const { createDataset } = await import('@/lib/datasets');
  const jobs = await import('@/lib/fitting/jobs');

  async function workspace(slug: string) {
    const user = await m.User.create({ email: `${slug}@bench.test`, name: slug, passwordHash: 'unused', emailVerifiedAt: new Date() });
    const ws = await m.Workspace.create({ name: slug, slug });
    await m.Membership.create({ userId: user.id, workspaceId: ws.id, role: 'owner' });
    await m.Subscription.create({ workspaceId: ws.id, plan: 'lab', status: 'active' });
    const dataset = await createDataset({ workspaceId: ws.id, userId: user.id, bytes: new TextEncoder().encode(ridesCsv(ROWS)), filename: `${slug}.csv` });
    return { user, ws, dataset };
  }
  const a = await workspace('bench-a');
  const b = await workspace('bench-b');
  const features = ['avg_speed_kmh', 'weekly_distance_km', 'climb_per_ride_m'];

  const heavy = { features, minComponents: 1, maxComponents: 10, covariances: ['full', 'diagonal', 'spherical', 'tied'], restarts: 10, seed: 3, maxIter: 1000, tol: 1e-7 };
  const aFits = [];
  for (let i = 0; i < HEAVY; i++) aFits.push(await jobs.startFit(a.ws.id, a.user.id, { ...heavy, datasetId: a.dataset.id, seed: 3 + i }));
  for (;;) {
    const first = await m.Fit.findByPk(aFits[0].id);
    if (first?.status === 'running') break;
    await sleep(20);
  }
  await sleep(1000); // A's fit is well under way

  const t0 = Date.now();
  const tiny = await jobs.startFit(b.ws.id, b.user.id, { datasetId: b.dataset.id, features, minComponents: 2, maxComponents: 2, covariances: ['full'], restarts: 1, seed: 1 });
  let startedMs: number | null = null;
  let finishedMs: number | null = null;
  while (Date.now() - t0 < TIMEOUT_MS) {
    const row = (await m.Fit.findByPk(tiny.id))!;
    if (startedMs === null && row.status !== 'queued') startedMs = Date.now() - t0;
    if (!['queued', 'running'].includes(row.status)) {
      finishedMs = Date.now() - t0;
      break;
    }
    await sleep(20);
  }
  const aRows = await m.Fit.findAll({ where: { id: aFits.map((f) => f.id) }, order: [['id', 'ASC']] });
  const slots = process.env.PARTWISE_FIT_SLOTS ?? process.env.PARTWISE_FIT_CONCURRENCY ?? '(default)';
  console.log(`fit slots: ${slots}; slice: ${process.env.PARTWISE_FIT_SLICE_MS ?? '(default)'} ms; ${ROWS} rows; ${HEAVY} heavy fit(s) of workspace A queued first`);
  console.log(`workspace B's tiny fit started after: ${startedMs === null ? `not within ${TIMEOUT_MS / 1000} s` : `${(startedMs / 1000).toFixed(2)} s`}`);
  console.log(`workspace B's tiny fit finished after: ${finishedMs === null ? `not within ${TIMEOUT_MS / 1000} s` : `${(finishedMs / 1000).toFixed(2)} s`}`);
  for (const f of aRows) {
    const p = (f.progress ?? {}) as { candidate?: number; candidates?: number };
    console.log(`  A's fit #${f.id}: ${f.status}${p.candidate ? `, at candidate ${p.candidate} of ${p.candidates}` : ''}`);
  }
  for (const f of [...aRows, tiny]) await jobs.cancelFit(f.workspaceId, f.id).catch(() => {});
  while (jobs.activeFitIds().length) await sleep(50);
  await m.sequelize.close();
  fs.rmSync(file, { force: true });
}

main().catch((e) => {
  console.error(e);
  process.exit(1);
});

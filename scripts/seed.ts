import bcrypt from 'bcryptjs';
import { DEMO_USERS, DEMO_WORKSPACE } from '@/lib/demo/accounts';
import { demoRidesCsv } from '@/lib/demo/cycling';

/**
 * Seed the demo scenario once (idempotent: an existing demo owner means done).
 * Models are imported lazily so DATABASE_URL set by the caller is honoured.
 */
export async function seedDemo(): Promise<void> {
  const m = await import('@/models');
  const existing = await m.User.findOne({ where: { email: DEMO_USERS.owner.email } });
  if (!existing) await seedAccountsAndData(m);
  else console.log('[partwise] demo accounts already present.');

  // Later steps are idempotent on their own, so a partly seeded database completes.
  const owner = (await m.User.findOne({ where: { email: DEMO_USERS.owner.email } }))!;
  const workspace = (await m.Workspace.findOne({ where: { slug: DEMO_WORKSPACE.slug } }))!;
  const dataset = (await m.Dataset.findOne({ where: { workspaceId: workspace.id }, order: [['id', 'ASC']] }))!;
  const { seedDemoModel } = await import('@/lib/demo/model');
  const { seedDemoCalculator } = await import('@/lib/demo/calculator');
  const { seedDemoSecondVersion } = await import('@/lib/demo/second-version');
  await seedDemoModel({ workspace, owner, dataset });
  await seedDemoCalculator({ workspace, owner });
  await seedDemoSecondVersion({ workspace, owner });
  const { seedDemoInsight } = await import('@/lib/demo/insight');
  await seedDemoInsight({ workspace });
}

async function seedAccountsAndData(m: typeof import('@/models')) {
  await m.sequelize.transaction(async (transaction) => {
    const now = new Date();
    const hash = (p: string) => bcrypt.hash(p, 10);
    const owner = await m.User.create({ email: DEMO_USERS.owner.email, name: DEMO_USERS.owner.name, passwordHash: await hash(DEMO_USERS.owner.password), emailVerifiedAt: now }, { transaction });
    const member = await m.User.create({ email: DEMO_USERS.member.email, name: DEMO_USERS.member.name, passwordHash: await hash(DEMO_USERS.member.password), emailVerifiedAt: now }, { transaction });
    await m.User.create({ email: DEMO_USERS.staff.email, name: DEMO_USERS.staff.name, passwordHash: await hash(DEMO_USERS.staff.password), emailVerifiedAt: now, isStaff: true }, { transaction });
    const workspace = await m.Workspace.create(DEMO_WORKSPACE, { transaction });
    await m.Membership.create({ userId: owner.id, workspaceId: workspace.id, role: 'owner' }, { transaction });
    await m.Membership.create({ userId: member.id, workspaceId: workspace.id, role: 'member' }, { transaction });
    await m.Subscription.create({ workspaceId: workspace.id, plan: 'sketch', status: 'active' }, { transaction });

    const csv = demoRidesCsv();
    // The same parser as an upload, so the demo dataset has the columns an analyst would get.
    const { parseCsvText } = await import('@/lib/datasets/parse');
    const table = parseCsvText(csv);
    await m.Dataset.create(
      { workspaceId: workspace.id, createdById: owner.id, name: 'Ride logs, autumn season', originalFilename: 'riverside-rides.csv', originalCsv: Buffer.from(csv), columns: table.columns, cells: table.cells, rowCount: table.cells.length },
      { transaction },
    );
  });
  console.log('[partwise] demo workspace, accounts and ride logs seeded.');
}

if (process.argv[1] && /seed\.ts$/.test(process.argv[1])) {
  seedDemo()
    .then(async () => (await import('@/models')).sequelize.close())
    .catch((e) => {
      console.error('[partwise] seeding failed:', e);
      process.exit(1);
    });
}

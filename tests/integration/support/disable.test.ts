import { beforeAll, describe, expect, it } from 'vitest';
import { POST as scoreRoute } from '@/app/api/score/[token]/route';
import { POST as disableRoute } from '@/app/api/support/calculators/[id]/disable/route';
import { POST as enableRoute } from '@/app/api/support/calculators/[id]/enable/route';
import { POST as suspendRoute } from '@/app/api/support/workspaces/[id]/suspend/route';
import { POST as restoreRoute } from '@/app/api/support/workspaces/[id]/restore/route';
import { AbuseReport, AuditEvent, Embed, MailMessage, Workspace } from '@/models';
import { makeRequest } from '../../helpers/auth';
import { calculator, report, RIDE, staffUser, workspaceWithOwner } from './fixtures';

let staff: { id: number; email: string };
let ownerEmail: string;
let embed: Embed;
let sibling: Embed;
let workspace: Workspace;

// A long cache TTL: only invalidation, not expiry, can make the change visible.
process.env.PARTWISE_EMBED_CACHE_MS = '600000';

const ctx = (id: number) => ({ params: Promise.resolve({ id: String(id) }) });
async function staffPost(handler: typeof disableRoute, path: string, id: number, json: unknown, userId = staff.id) {
  const res = await handler(await makeRequest(path, { userId, json, headers: { 'x-forwarded-for': '198.51.100.7' } }), ctx(id));
  return { status: res.status, body: await res.json() };
}
let scoreAddress = 0;
async function score(token: string) {
  // A fresh address per call keeps the per-address limit out of the way.
  const req = await makeRequest(`/api/score/${token}`, { json: { values: RIDE }, headers: { 'x-forwarded-for': `203.0.113.${++scoreAddress}` } });
  return scoreRoute(req, { params: Promise.resolve({ token }) });
}

beforeAll(async () => {
  const s = await staffUser();
  staff = { id: s.id, email: s.email };
  const w = await workspaceWithOwner({ name: 'Riverside', ownerEmail: 'maren@riverside.example', plan: 'lab' });
  ownerEmail = w.owner.email;
  workspace = w.workspace;
  embed = await calculator(workspace, { title: 'Ride groups', token: 'DisableMe_0123456789abcdef' });
  sibling = await calculator(workspace, { title: 'Pace finder', token: 'Sibling_0123456789abcdefgh' });
  await report(embed);
  await report(embed);
});

describe('disable and enable a calculator', () => {
  it('answers before, 410 right after disabling (warm cache), and again after enabling', async () => {
    expect((await score(embed.token)).status).toBe(200);

    const disabled = await staffPost(disableRoute, `/api/support/calculators/${embed.id}/disable`, embed.id, { reason: 'Reported twice for advice that endangers riders.', closeReports: true });
    expect(disabled.status).toBe(200);
    expect(disabled.body).toMatchObject({ calculator: { status: 'disabled', disabledReason: 'Reported twice for advice that endangers riders.' }, closedReports: 2, ownersNotified: 1 });

    const refused = await score(embed.token);
    expect(refused.status).toBe(410);
    expect((await refused.json()).error.code).toBe('gone');
    // Only that calculator: its sibling keeps answering.
    expect((await score(sibling.token)).status).toBe(200);
    expect(await AbuseReport.count({ where: { embedId: embed.id, status: 'open' } })).toBe(0);

    const enabled = await staffPost(enableRoute, `/api/support/calculators/${embed.id}/enable`, embed.id, { reason: 'Owner rewrote the cluster descriptions.' });
    expect(enabled.status).toBe(200);
    expect((await score(embed.token)).status).toBe(200);
    const row = (await Embed.findByPk(embed.id))!;
    expect(row).toMatchObject({ status: 'active', disabledReason: null, disabledAt: null });
  });

  it('e-mailed the owner each time, with the reason', async () => {
    const mails = await MailMessage.findAll({ where: { to: ownerEmail }, order: [['id', 'ASC']] });
    expect(mails.map((m) => m.kind)).toEqual(['support-embed-disabled', 'support-embed-enabled']);
    expect(mails[0].subject).toContain('Ride groups');
    expect(mails[0].text).toContain('Reported twice for advice that endangers riders.');
    expect(mails[0].text).toContain('/embed/DisableMe_0123456789abcdef');
    expect(mails[1].text).toContain('Owner rewrote the cluster descriptions.');
  });

  it('audited both actions: who, what, why, from where', async () => {
    const events = await AuditEvent.findAll({ where: { targetType: 'embed', targetId: String(embed.id) }, order: [['id', 'ASC']] });
    expect(events.map((e) => e.action)).toEqual(['support.embed_disabled', 'support.embed_enabled']);
    expect(events[0]).toMatchObject({ actorUserId: staff.id, actorEmail: staff.email, workspaceId: workspace.id, address: '198.51.100.7' });
    expect(events[0].detail).toMatchObject({ reason: 'Reported twice for advice that endangers riders.', closedReports: 2 });
    expect(events[1].detail).toMatchObject({ previousReason: 'Reported twice for advice that endangers riders.' });
  });

  it('requires a reason: empty, blank, missing and overlong reasons are refused with the field named, and nothing changes', async () => {
    for (const body of [{ reason: '' }, { reason: '    ' }, {}, { reason: 'x'.repeat(1001) }, { reason: 42 }]) {
      const res = await staffPost(disableRoute, `/api/support/calculators/${embed.id}/disable`, embed.id, body);
      expect(res.status, JSON.stringify(body)).toBe(422);
      expect(res.body.error.issues[0].field).toBe('reason');
    }
    const unknownKey = await staffPost(disableRoute, `/api/support/calculators/${embed.id}/disable`, embed.id, { reason: 'Long enough reason', force: true });
    expect(unknownKey.status).toBe(422);
    expect((await Embed.findByPk(embed.id))!.status).toBe('active');
    expect((await score(embed.token)).status).toBe(200);
  });

  it('refuses to enable what is not disabled, and to disable twice', async () => {
    expect((await staffPost(enableRoute, `/api/support/calculators/${embed.id}/enable`, embed.id, { reason: 'Just checking this.' })).status).toBe(409);
    expect((await staffPost(disableRoute, `/api/support/calculators/${embed.id}/disable`, embed.id, { reason: 'First time round.' })).status).toBe(200);
    expect((await staffPost(disableRoute, `/api/support/calculators/${embed.id}/disable`, embed.id, { reason: 'Second time round.' })).status).toBe(409);
    expect(await AuditEvent.count({ where: { action: 'support.embed_disabled', targetId: String(embed.id) } })).toBe(2);
    expect((await staffPost(enableRoute, `/api/support/calculators/${embed.id}/enable`, embed.id, { reason: 'Back on for the next test.' })).status).toBe(200);
    expect((await staffPost(disableRoute, '/api/support/calculators/424242/disable', 424242, { reason: 'Nobody home here.' })).status).toBe(404);
  });

  it('a member or owner of the workspace cannot use the support routes', async () => {
    const { Membership } = await import('@/models');
    const memberships = await Membership.findAll({ where: { workspaceId: workspace.id } });
    for (const m of memberships) {
      const res = await staffPost(disableRoute, `/api/support/calculators/${embed.id}/disable`, embed.id, { reason: 'I want it off myself.' }, m.userId);
      expect(res.status).toBe(403);
    }
    const visitor = await disableRoute(await makeRequest(`/api/support/calculators/${embed.id}/disable`, { json: { reason: 'Visitors cannot.' } }), ctx(embed.id));
    expect(visitor.status).toBe(401);
    expect((await Embed.findByPk(embed.id))!.status).toBe('active');
  });
});

describe('suspend and restore a workspace', () => {
  it('silences every calculator of the workspace at once and brings them back', async () => {
    expect((await score(sibling.token)).status).toBe(200);
    const suspended = await staffPost(suspendRoute, `/api/support/workspaces/${workspace.id}/suspend`, workspace.id, { reason: 'Payment fraud under investigation.' });
    expect(suspended.status).toBe(200);
    expect((await score(embed.token)).status).toBe(410);
    expect((await score(sibling.token)).status).toBe(410);
    expect((await staffPost(suspendRoute, `/api/support/workspaces/${workspace.id}/suspend`, workspace.id, { reason: 'Again, by mistake.' })).status).toBe(409);

    const restored = await staffPost(restoreRoute, `/api/support/workspaces/${workspace.id}/restore`, workspace.id, { reason: 'Investigation closed, all clear.' });
    expect(restored.status).toBe(200);
    expect((await score(embed.token)).status).toBe(200);
    expect((await score(sibling.token)).status).toBe(200);
    expect((await staffPost(restoreRoute, `/api/support/workspaces/${workspace.id}/restore`, workspace.id, { reason: 'Nothing to restore.' })).status).toBe(409);
  });

  it('keeps a staff-disabled calculator off when its workspace is restored', async () => {
    await staffPost(disableRoute, `/api/support/calculators/${sibling.id}/disable`, sibling.id, { reason: 'Copies another club.' });
    await staffPost(suspendRoute, `/api/support/workspaces/${workspace.id}/suspend`, workspace.id, { reason: 'Second investigation.' });
    await staffPost(restoreRoute, `/api/support/workspaces/${workspace.id}/restore`, workspace.id, { reason: 'Second one closed too.' });
    expect((await score(sibling.token)).status).toBe(410);
    expect((await score(embed.token)).status).toBe(200);
  });

  it('audited and e-mailed the suspension and the restore', async () => {
    const events = await AuditEvent.findAll({ where: { targetType: 'workspace', targetId: String(workspace.id) }, order: [['id', 'ASC']] });
    expect(events.map((e) => e.action)).toEqual(['support.workspace_suspended', 'support.workspace_restored', 'support.workspace_suspended', 'support.workspace_restored']);
    expect(events[0].detail).toMatchObject({ reason: 'Payment fraud under investigation.', calculators: 2 });
    const kinds = (await MailMessage.findAll({ where: { to: ownerEmail } })).map((m) => m.kind);
    expect(kinds.filter((k) => k === 'support-workspace-suspended')).toHaveLength(2);
    expect(kinds.filter((k) => k === 'support-workspace-restored')).toHaveLength(2);
  });
});

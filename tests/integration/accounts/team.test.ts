import bcrypt from 'bcryptjs';
import { beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { makeRequest } from '../../helpers/auth';
import { POST as inviteRoute } from '@/app/api/team/invitations/route';
import { DELETE as revokeRoute } from '@/app/api/team/invitations/[id]/route';
import { GET as describeRoute, POST as acceptRoute } from '@/app/api/team/invitations/accept/route';
import { DELETE as removeRoute, PATCH as roleRoute } from '@/app/api/team/members/[id]/route';
import { GET as teamRoute } from '@/app/api/team/route';
import { POST as switchRoute } from '@/app/api/workspaces/current/route';
import { GET as workspacesRoute, POST as createWorkspaceRoute } from '@/app/api/workspaces/route';
import { authorizeCredentials } from '@/lib/auth/credentials';
import { hashToken } from '@/lib/accounts/tokens';
import { rateLimitTesting } from '@/lib/rate-limit';
import { Invitation, Membership, Subscription, User, Workspace } from '@/models';
import { linkToken, useMailSink } from './mail-helpers';

const sink = useMailSink();
const none = { params: Promise.resolve({}) };
const withId = (id: number) => ({ params: Promise.resolve({ id: String(id) }) });

let owner: User;
let member: User;
let lab: Workspace;
let sketch: Workspace;
let existing: User;

beforeAll(async () => {
  const mk = async (email: string, name: string) => User.create({ email, name, passwordHash: await bcrypt.hash('known-password-1', 4), emailVerifiedAt: new Date() });
  owner = await mk('olga@club.test', 'Olga Berg');
  member = await mk('mo@club.test', 'Mo Reyes');
  existing = await mk('pat@elsewhere.test', 'Pat Quinn');
  lab = await Workspace.create({ name: 'Lab Riders', slug: 'lab-riders' });
  sketch = await Workspace.create({ name: 'Solo Sketch', slug: 'solo-sketch' });
  await Subscription.bulkCreate([{ workspaceId: lab.id, plan: 'lab' }, { workspaceId: sketch.id, plan: 'sketch' }]);
  await Membership.bulkCreate([
    { userId: owner.id, workspaceId: lab.id, role: 'owner' },
    { userId: member.id, workspaceId: lab.id, role: 'member' },
    { userId: owner.id, workspaceId: sketch.id, role: 'owner' },
  ]);
});
beforeEach(() => rateLimitTesting.clear());

const invite = async (as: User, workspaceId: number, json: unknown) => inviteRoute(await makeRequest('/api/team/invitations', { userId: as.id, workspaceId, json }), none);

describe('invitations', () => {
  it('a new person accepts by choosing a name and password, and joins as member', async () => {
    const res = await invite(owner, lab.id, { email: 'New.Rider@Club.test' });
    expect(res.status).toBe(201);
    const body = await res.json();
    expect(body.invitation).toMatchObject({ email: 'new.rider@club.test', role: 'member' });
    expect(JSON.stringify(body)).not.toMatch(/token/i);

    const mail = await sink.mailTo('new.rider@club.test', 'invitation');
    expect(mail.subject).toContain('Lab Riders');
    const token = linkToken(mail, '/invite');
    const stored = (await Invitation.findByPk(body.invitation.id))!;
    expect(stored.tokenHash).toBe(hashToken(token));
    expect(stored.expiresAt.getTime() - Date.now()).toBeGreaterThan(6.9 * 24 * 3600_000);

    const described = await describeRoute(await makeRequest(`/api/team/invitations/accept?token=${token}`), none);
    expect((await described.json()).invitation).toMatchObject({ workspaceName: 'Lab Riders', role: 'member', accountExists: false, inviterName: 'Olga Berg' });

    const missing = await acceptRoute(await makeRequest('/api/team/invitations/accept', { json: { token } }), none);
    expect(missing.status).toBe(422);
    expect((await missing.json()).error.issues.map((i: { field: string }) => i.field)).toEqual(['name', 'password']);

    // A guessable password is refused on the password field and leaves the invitation usable.
    for (const weak of ['nia-rider-2026', 'password1234']) {
      const refused = await acceptRoute(await makeRequest('/api/team/invitations/accept', { json: { token, name: 'Nia Rider', password: weak } }), none);
      expect(refused.status).toBe(422);
      expect((await refused.json()).error.issues).toEqual([expect.objectContaining({ field: 'password', message: expect.stringMatching(/name|too easy to guess/) })]);
    }
    expect(await User.count({ where: { email: 'new.rider@club.test' } })).toBe(0);

    const accepted = await acceptRoute(await makeRequest('/api/team/invitations/accept', { json: { token, name: 'Nia Rider', password: 'saddle-lantern-41' } }), none);
    expect(accepted.status).toBe(200);
    expect(accepted.headers.get('set-cookie')).toContain(`partwise.workspace=${lab.id}`);
    const user = (await User.findOne({ where: { email: 'new.rider@club.test' } }))!;
    expect((await Membership.findOne({ where: { userId: user.id, workspaceId: lab.id } }))!.role).toBe('member');
    expect(await Membership.count({ where: { userId: user.id } })).toBe(1);
    // The mailed link proved the address: the new account can sign in right away.
    expect(await authorizeCredentials({ email: 'new.rider@club.test', password: 'saddle-lantern-41' })).not.toBeNull();

    const reuse = await acceptRoute(await makeRequest('/api/team/invitations/accept', { json: { token, name: 'X', password: 'another-pass-12' } }), none);
    expect(reuse.status).toBe(410);
  });

  it('an existing account accepts only when signed in as the invited address', async () => {
    await invite(owner, lab.id, { email: 'pat@elsewhere.test', role: 'owner' });
    const token = linkToken(await sink.mailTo('pat@elsewhere.test', 'invitation'), '/invite');
    const described = await (await describeRoute(await makeRequest(`/api/team/invitations/accept?token=${token}`), none)).json();
    expect(described.invitation).toMatchObject({ accountExists: true, role: 'owner' });

    const anonymous = await acceptRoute(await makeRequest('/api/team/invitations/accept', { json: { token } }), none);
    expect(anonymous.status).toBe(401);
    const wrongPerson = await acceptRoute(await makeRequest('/api/team/invitations/accept', { userId: member.id, json: { token } }), none);
    expect(wrongPerson.status).toBe(403);
    expect((await wrongPerson.json()).error.message).toContain('pat@elsewhere.test');
    const ok = await acceptRoute(await makeRequest('/api/team/invitations/accept', { userId: existing.id, json: { token } }), none);
    expect(ok.status).toBe(200);
    expect((await Membership.findOne({ where: { userId: existing.id, workspaceId: lab.id } }))!.role).toBe('owner');
  });

  it('refuses an expired invitation', async () => {
    await invite(owner, lab.id, { email: 'slow@club.test' });
    const token = linkToken(await sink.mailTo('slow@club.test', 'invitation'), '/invite');
    await Invitation.update({ expiresAt: new Date(Date.now() - 60_000) }, { where: { tokenHash: hashToken(token) } });
    const described = await describeRoute(await makeRequest(`/api/team/invitations/accept?token=${token}`), none);
    expect(described.status).toBe(410);
    expect((await described.json()).error.message).toMatch(/expired/);
    const accept = await acceptRoute(await makeRequest('/api/team/invitations/accept', { json: { token, name: 'Slow', password: 'slow-rider-pass' } }), none);
    expect(accept.status).toBe(410);
    expect(await User.count({ where: { email: 'slow@club.test' } })).toBe(0);
  });

  it('a withdrawn or re-sent invitation invalidates the old link', async () => {
    const first = await (await invite(owner, lab.id, { email: 'twice@club.test' })).json();
    const oldToken = linkToken(await sink.mailTo('twice@club.test', 'invitation'), '/invite');
    const second = await (await invite(owner, lab.id, { email: 'twice@club.test' })).json();
    expect(second.invitation.id).not.toBe(first.invitation.id);
    expect((await describeRoute(await makeRequest(`/api/team/invitations/accept?token=${oldToken}`), none)).status).toBe(404);
    const revoke = await revokeRoute(await makeRequest(`/api/team/invitations/${second.invitation.id}`, { method: 'DELETE', userId: owner.id, workspaceId: lab.id }), withId(second.invitation.id));
    expect(revoke.status).toBe(204);
    expect(await Invitation.count({ where: { email: 'twice@club.test' } })).toBe(0);
  });

  it('refuses an address already in the workspace, and 402 past the plan’s seats', async () => {
    const dup = await invite(owner, lab.id, { email: 'mo@club.test' });
    expect(dup.status).toBe(409);
    // Sketch has two seats: the owner and one invitation fill it.
    expect((await invite(owner, sketch.id, { email: 'friend@club.test' })).status).toBe(201);
    const full = await invite(owner, sketch.id, { email: 'second-friend@club.test' });
    expect(full.status).toBe(402);
    const err = (await full.json()).error;
    expect(err.code).toBe('plan_limit');
    expect(err.message).toMatch(/Sketch plan includes 2 seats/);
  });

  it('answers 422 for a bad address or role', async () => {
    const res = await invite(owner, lab.id, { email: 'not-an-address', role: 'boss' });
    expect(res.status).toBe(422);
    expect((await res.json()).error.issues.map((i: { field: string }) => i.field).sort()).toEqual(['email', 'role']);
  });
});

describe('roles in the team', () => {
  it('a member sees the team but cannot reach owner routes', async () => {
    const team = await teamRoute(await makeRequest('/api/team', { userId: member.id, workspaceId: lab.id }), none);
    expect(team.status).toBe(200);
    const body = await team.json();
    expect(body.role).toBe('member');
    expect(body.members.map((m: { email: string }) => m.email)).toContain('olga@club.test');

    expect((await invite(member, lab.id, { email: 'x@club.test' })).status).toBe(403);
    const ownerMembership = (await Membership.findOne({ where: { userId: owner.id, workspaceId: lab.id } }))!;
    const patch = await roleRoute(await makeRequest(`/api/team/members/${ownerMembership.id}`, { method: 'PATCH', userId: member.id, workspaceId: lab.id, json: { role: 'member' } }), withId(ownerMembership.id));
    expect(patch.status).toBe(403);
    const del = await removeRoute(await makeRequest(`/api/team/members/${ownerMembership.id}`, { method: 'DELETE', userId: member.id, workspaceId: lab.id }), withId(ownerMembership.id));
    expect(del.status).toBe(403);
    const inv = await Invitation.findOne({ where: { workspaceId: lab.id, acceptedAt: null } });
    if (inv) expect((await revokeRoute(await makeRequest(`/api/team/invitations/${inv.id}`, { method: 'DELETE', userId: member.id, workspaceId: lab.id }), withId(inv.id))).status).toBe(403);
    expect((await Membership.findByPk(ownerMembership.id))!.role).toBe('owner');
  });

  it('the last owner can be neither demoted nor removed (409), another owner can', async () => {
    const own = (await Membership.findOne({ where: { userId: owner.id, workspaceId: sketch.id } }))!;
    const demote = await roleRoute(await makeRequest(`/api/team/members/${own.id}`, { method: 'PATCH', userId: owner.id, workspaceId: sketch.id, json: { role: 'member' } }), withId(own.id));
    expect(demote.status).toBe(409);
    expect((await demote.json()).error.message).toMatch(/last owner of Solo Sketch/);
    const remove = await removeRoute(await makeRequest(`/api/team/members/${own.id}`, { method: 'DELETE', userId: owner.id, workspaceId: sketch.id }), withId(own.id));
    expect(remove.status).toBe(409);

    // In Lab Riders, Pat became a second owner above: now Olga's demotion is allowed.
    const olga = (await Membership.findOne({ where: { userId: owner.id, workspaceId: lab.id } }))!;
    const ok = await roleRoute(await makeRequest(`/api/team/members/${olga.id}`, { method: 'PATCH', userId: existing.id, workspaceId: lab.id, json: { role: 'member' } }), withId(olga.id));
    expect(ok.status).toBe(200);
    expect((await ok.json()).member.role).toBe('member');
    // Olga is a member now: her owner routes are closed at once (roles come from the database).
    expect((await invite(owner, lab.id, { email: 'y@club.test' })).status).toBe(403);
    const back = await roleRoute(await makeRequest(`/api/team/members/${olga.id}`, { method: 'PATCH', userId: existing.id, workspaceId: lab.id, json: { role: 'owner' } }), withId(olga.id));
    expect(back.status).toBe(200);

    const mo = (await Membership.findOne({ where: { userId: member.id, workspaceId: lab.id } }))!;
    const removed = await removeRoute(await makeRequest(`/api/team/members/${mo.id}`, { method: 'DELETE', userId: owner.id, workspaceId: lab.id }), withId(mo.id));
    expect(removed.status).toBe(204);
    expect((await teamRoute(await makeRequest('/api/team', { userId: member.id, workspaceId: lab.id }), none)).status).toBe(403);
  });

  it('a membership id from another workspace is 404', async () => {
    const labMembership = (await Membership.findOne({ where: { workspaceId: lab.id } }))!;
    const res = await removeRoute(await makeRequest(`/api/team/members/${labMembership.id}`, { method: 'DELETE', userId: owner.id, workspaceId: sketch.id }), withId(labMembership.id));
    expect(res.status).toBe(404);
  });
});

describe('workspace switch', () => {
  it('lists my workspaces, switches only to ones I belong to, and creates new ones', async () => {
    const list = await (await workspacesRoute(await makeRequest('/api/workspaces', { userId: owner.id }), none)).json();
    expect(list.workspaces.map((w: { name: string }) => w.name).sort()).toEqual(['Lab Riders', 'Solo Sketch']);

    const ok = await switchRoute(await makeRequest('/api/workspaces/current', { userId: owner.id, json: { workspaceId: sketch.id } }), none);
    expect(ok.status).toBe(200);
    expect(ok.headers.get('set-cookie')).toMatch(new RegExp(`^partwise\\.workspace=${sketch.id}; Path=/; HttpOnly; SameSite=Lax`));
    const refused = await switchRoute(await makeRequest('/api/workspaces/current', { userId: existing.id, json: { workspaceId: sketch.id } }), none);
    expect(refused.status).toBe(403);
    const visitor = await switchRoute(await makeRequest('/api/workspaces/current', { json: { workspaceId: sketch.id } }), none);
    expect(visitor.status).toBe(401);

    const created = await createWorkspaceRoute(await makeRequest('/api/workspaces', { userId: existing.id, json: { name: 'Gravel Notes' } }), none);
    expect(created.status).toBe(201);
    const ws = (await created.json()).workspace;
    expect(ws).toMatchObject({ name: 'Gravel Notes', role: 'owner' });
    expect((await Subscription.findOne({ where: { workspaceId: ws.id } }))!.plan).toBe('sketch');
  });
});

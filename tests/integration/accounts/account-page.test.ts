/**
 * The account page's routes: change one's name, change the password (the current one
 * required), and delete the account (typed e-mail and password; an only owner of a
 * workspace with other people is stopped with the way out; sessions end; audit stays).
 */
import bcrypt from 'bcryptjs';
import { beforeAll, describe, expect, it } from 'vitest';
import { DELETE as deleteAccountRoute, GET as meRoute, PATCH as profileRoute } from '@/app/api/account/route';
import { PUT as passwordRoute } from '@/app/api/account/password/route';
import { GET as datasetsRoute } from '@/app/api/datasets/route';
import { AuditEvent, AuthToken, Dataset, Membership, Subscription, User, Workspace } from '@/models';
import { makeRequest, sessionCookie } from '../../helpers/auth';

const none = { params: Promise.resolve({}) };
const PASSWORD = 'long enough secret 1';

async function person(email: string, name = email.split('@')[0]) {
  return User.create({ email, name, passwordHash: await bcrypt.hash(PASSWORD, 4), emailVerifiedAt: new Date() });
}
async function workspace(slug: string, members: [User, 'owner' | 'member'][], plan = 'sketch') {
  const ws = await Workspace.create({ name: slug[0].toUpperCase() + slug.slice(1), slug });
  for (const [u, role] of members) await Membership.create({ userId: u.id, workspaceId: ws.id, role });
  await Subscription.create({ workspaceId: ws.id, plan, status: 'active' });
  return ws;
}
const call = async (handler: (r: Request, c: typeof none) => Promise<Response> | Response, method: string, userId: number, json?: unknown) => {
  const res = await handler(await makeRequest('/api/account', { method, userId, json }), none);
  return { status: res.status, json: (await res.json()) as any, headers: res.headers };
};

describe('name', () => {
  it('changes the name, refuses an empty one next to its field, and records it', async () => {
    const u = await person('name@account.test', 'Old Name');
    const ok = await call(profileRoute, 'PATCH', u.id, { name: '  Ada Rider ' });
    expect(ok.status).toBe(200);
    expect(ok.json.user.name).toBe('Ada Rider');
    expect((await User.findByPk(u.id))!.name).toBe('Ada Rider');
    const bad = await call(profileRoute, 'PATCH', u.id, { name: '   ' });
    expect(bad.status).toBe(422);
    expect(bad.json.error.issues).toEqual([{ field: 'name', message: 'Tell us what to call you.' }]);
    expect(await AuditEvent.count({ where: { action: 'account.name_changed', actorUserId: u.id } })).toBe(1);
  });

  it('needs a session', async () => {
    const res = await profileRoute(await makeRequest('/api/account', { method: 'PATCH', json: { name: 'X' } }), none);
    expect(res.status).toBe(401);
  });
});

describe('password', () => {
  it('needs the current password, follows the password rules, and works for the next sign-in', async () => {
    const u = await person('pw@account.test');
    await AuthToken.create({ userId: u.id, purpose: 'reset-password', tokenHash: 'x'.repeat(64), expiresAt: new Date(Date.now() + 3600_000) });
    const wrong = await call(passwordRoute, 'PUT', u.id, { currentPassword: 'not it at all', newPassword: 'a brand new secret' });
    expect(wrong.status).toBe(422);
    expect(wrong.json.error.issues[0]).toEqual({ field: 'currentPassword', message: 'That is not your current password.' });
    const short = await call(passwordRoute, 'PUT', u.id, { currentPassword: PASSWORD, newPassword: 'short' });
    expect(short.status).toBe(422);
    expect(short.json.error.issues[0].field).toBe('newPassword');
    expect(short.json.error.issues[0].message).toMatch(/at least 10 characters/);
    const same = await call(passwordRoute, 'PUT', u.id, { currentPassword: PASSWORD, newPassword: PASSWORD });
    expect(same.json.error.issues[0]).toEqual({ field: 'newPassword', message: 'Choose a password different from the current one.' });
    expect(await bcrypt.compare(PASSWORD, (await User.findByPk(u.id))!.passwordHash)).toBe(true);

    // A common password is refused on the new-password field (the strength rules of sign-up and reset).
    const common = await call(passwordRoute, 'PUT', u.id, { currentPassword: PASSWORD, newPassword: 'password1234' });
    expect(common.status).toBe(422);
    expect(common.json.error.issues[0].field).toBe('newPassword');

    const before = (await User.findByPk(u.id))!.sessionGeneration;
    const ok = await call(passwordRoute, 'PUT', u.id, { currentPassword: PASSWORD, newPassword: 'a brand new secret' });
    expect(ok.status).toBe(200);
    expect(ok.json.signInAgain).toBe(true);
    // Every session made with the old password ends, this one included.
    const old = await meRoute(new Request('http://localhost:3000/api/account', { headers: { cookie: await sessionCookie(u.id, undefined, { generation: before }) } }), { params: Promise.resolve({}) });
    expect(old.status).toBe(401);
    const stored = (await User.findByPk(u.id))!.passwordHash;
    expect(await bcrypt.compare('a brand new secret', stored)).toBe(true);
    expect(await bcrypt.compare(PASSWORD, stored)).toBe(false);
    // A reset link asked for under the old password no longer works.
    expect(await AuthToken.count({ where: { userId: u.id, purpose: 'reset-password', usedAt: null } })).toBe(0);
    expect(await AuditEvent.count({ where: { action: 'account.password_changed', actorUserId: u.id } })).toBe(1);
  });

  it('limits wrong current passwords', async () => {
    const u = await person('guess@account.test');
    const statuses: number[] = [];
    for (let i = 0; i < 7; i++) statuses.push((await call(passwordRoute, 'PUT', u.id, { currentPassword: `guess ${i}`, newPassword: 'a brand new secret' })).status);
    expect(statuses.slice(0, 5)).toEqual([422, 422, 422, 422, 422]);
    expect(statuses.slice(5)).toEqual([429, 429]);
  });
});

describe('deleting the account', () => {
  it('is confirmed by the typed e-mail address and the password', async () => {
    const u = await person('careful@account.test');
    const typo = await call(deleteAccountRoute, 'DELETE', u.id, { confirmEmail: 'carefull@account.test', password: PASSWORD });
    expect(typo.status).toBe(422);
    expect(typo.json.error.issues[0].field).toBe('confirmEmail');
    const wrong = await call(deleteAccountRoute, 'DELETE', u.id, { confirmEmail: 'careful@account.test', password: 'nope nope nope' });
    expect(wrong.status).toBe(422);
    expect(wrong.json.error.issues[0].field).toBe('password');
    expect(await User.findByPk(u.id)).not.toBeNull();
  });

  it('stops the only owner of a workspace with other people, saying how to hand it over', async () => {
    const owner = await person('solo-owner@account.test');
    const member = await person('member@account.test');
    const ws = await workspace('riverside', [[owner, 'owner'], [member, 'member']]);
    const refused = await call(deleteAccountRoute, 'DELETE', owner.id, { confirmEmail: 'Solo-Owner@account.test', password: PASSWORD });
    expect(refused.status).toBe(409);
    expect(refused.json.error.message).toMatch(/only owner of Riverside, which has 1 other person/);
    expect(refused.json.error.message).toMatch(/make someone else an owner/);
    expect(await User.findByPk(owner.id)).not.toBeNull();

    // Once the member is an owner too, the first owner can go; the workspace stays with them.
    await Membership.update({ role: 'owner' }, { where: { userId: member.id, workspaceId: ws.id } });
    const done = await call(deleteAccountRoute, 'DELETE', owner.id, { confirmEmail: 'solo-owner@account.test', password: PASSWORD });
    expect(done.status).toBe(200);
    expect(await User.findByPk(owner.id)).toBeNull();
    expect(await Workspace.findByPk(ws.id)).not.toBeNull();
    expect(await Membership.count({ where: { workspaceId: ws.id } })).toBe(1);
  });

  it('a member just leaves; the session stops working and the cookies are cleared; the audit trail keeps the entries', async () => {
    const owner = await person('keeper@account.test');
    const member = await person('leaver@account.test');
    const ws = await workspace('hilltop', [[owner, 'owner'], [member, 'member']]);
    await Dataset.create({ workspaceId: ws.id, createdById: member.id, name: 'Rides', originalFilename: 'r.csv', originalCsv: Buffer.from('a\n1\n'), columns: [], cells: [], rowCount: 0 });
    await call(profileRoute, 'PATCH', member.id, { name: 'Leaver L.' });
    const res = await call(deleteAccountRoute, 'DELETE', member.id, { confirmEmail: 'leaver@account.test', password: PASSWORD });
    expect(res.status).toBe(200);
    const cookies = res.headers.getSetCookie().join('\n');
    expect(cookies).toMatch(/next-auth\.session-token=;[^\n]*Max-Age=0/);
    expect(cookies).toMatch(/partwise\.workspace=;[^\n]*Max-Age=0/);
    // The same signed session cookie is now worthless.
    expect((await call(meRoute, 'GET', member.id)).status).toBe(401);
    expect((await datasetsRoute(await makeRequest('/api/datasets', { userId: member.id, workspaceId: ws.id }), none)).status).toBe(401);
    // Their data stays with the workspace; the trail still names them.
    expect(await Dataset.count({ where: { workspaceId: ws.id } })).toBe(1);
    const trail = await AuditEvent.findAll({ where: { actorUserId: member.id }, order: [['id', 'ASC']] });
    expect(trail.map((e) => e.action)).toEqual(['account.name_changed', 'account.deleted']);
    expect(trail[1].actorEmail).toBe('leaver@account.test');
    expect(trail[1].detail).toMatchObject({ left: ['Hilltop'], deletedWorkspaces: [] });
  });

  it("deletes a workspace where the person was alone, unless a paid plan would go on charging", async () => {
    const alone = await person('alone@account.test');
    const free = await workspace('solo', [[alone, 'owner']]);
    const paid = await workspace('paidsolo', [[alone, 'owner']], 'bench');
    const refused = await call(deleteAccountRoute, 'DELETE', alone.id, { confirmEmail: 'alone@account.test', password: PASSWORD });
    expect(refused.status).toBe(409);
    expect(refused.json.error.message).toMatch(/Paidsolo has a paid plan\. Cancel it on the Billing page first/);
    await Subscription.update({ cancelAtPeriodEnd: true }, { where: { workspaceId: paid.id } });
    const done = await call(deleteAccountRoute, 'DELETE', alone.id, { confirmEmail: 'alone@account.test', password: PASSWORD });
    expect(done.status).toBe(200);
    expect(done.json.deletedWorkspaces.sort()).toEqual(['Paidsolo', 'Solo']);
    expect(await Workspace.findByPk(free.id)).toBeNull();
    expect(await Workspace.findByPk(paid.id)).toBeNull();
    expect(await AuditEvent.count({ where: { action: 'workspace.deleted', actorUserId: alone.id } })).toBe(2);
  });
});

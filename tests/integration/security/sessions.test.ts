/**
 * Session generations (lib/auth/sessions.ts): a cookie signed in under an older
 * generation is refused everywhere a session is read — API routes (401), signed-in
 * pages (redirect to sign-in), next-auth's own renewal (the session endpoint's jwt
 * callback). The generation moves on "sign out everywhere", a password reset and the
 * suspension of a workspace (its members'). Cookies from before generations existed,
 * and sign-ins older than the absolute limit, are refused too.
 */
import { beforeAll, describe, expect, it, vi } from 'vitest';
import { encode } from 'next-auth/jwt';
import { GET as accountRoute } from '@/app/api/account/route';
import { DELETE as sessionsRoute } from '@/app/api/account/sessions/route';
import { POST as resetRoute } from '@/app/api/account/password/reset/route';
import { POST as suspendRoute } from '@/app/api/support/workspaces/[id]/suspend/route';
import { GET as teamRoute } from '@/app/api/team/route';
import { authOptions } from '@/lib/auth/options';
import { authSecret } from '@/lib/auth/secret';
import { sessionCookieName } from '@/lib/auth/cookies';
import { SESSION_ABSOLUTE_MAX_S, SESSION_MAX_AGE_S } from '@/lib/auth/sessions';
import { newLinkToken } from '@/lib/accounts/tokens';
import { addStaff } from '@/lib/accounts/staff';
import { AuditEvent, AuthToken, Membership, User, Workspace } from '@/models';
import { makeRequest, sessionCookie } from '../../helpers/auth';

// Signed-in pages read the cookie through next/headers; here it comes from `pageCookie`.
let pageCookie = '';
vi.mock('next/headers', () => ({
  headers: async () => new Headers({ 'user-agent': 'vitest' }),
  cookies: async () => ({
    getAll: () =>
      pageCookie
        .split('; ')
        .filter(Boolean)
        .map((pair) => ({ name: pair.slice(0, pair.indexOf('=')), value: pair.slice(pair.indexOf('=') + 1) })),
  }),
}));
const { pageWorkspace, pageStaff } = await import('@/lib/auth/page');

let n = 0;
async function person(opts: { staff?: boolean } = {}) {
  const i = ++n;
  return User.create({ email: `person${i}@sessions.test`, name: `Person ${i}`, passwordHash: 'x', emailVerifiedAt: new Date(), isStaff: opts.staff ?? false });
}
async function workspaceOf(...members: User[]) {
  const i = ++n;
  const workspace = await Workspace.create({ name: `Club ${i}`, slug: `sessions-club-${i}` });
  await Membership.bulkCreate(members.map((m, j) => ({ userId: m.id, workspaceId: workspace.id, role: j === 0 ? ('owner' as const) : ('member' as const) })));
  return workspace;
}

async function accountStatus(cookie: string) {
  const res = await accountRoute(new Request('http://localhost:3000/api/account', { headers: { cookie } }), { params: Promise.resolve({}) });
  return res.status;
}

/** Where a signed-in page sends this cookie: 'page' when it renders, else the redirect target. */
async function pageOutcome(cookie: string, kind: 'workspace' | 'staff' = 'workspace'): Promise<string> {
  pageCookie = cookie;
  try {
    if (kind === 'staff') await pageStaff();
    else await pageWorkspace('member', '/studio');
    return 'page';
  } catch (e) {
    const digest = String((e as { digest?: string }).digest ?? '');
    if (!digest.startsWith('NEXT_REDIRECT')) throw e;
    return digest.split(';')[2];
  }
}

async function renews(cookie: string): Promise<boolean> {
  const raw = cookie.split('; ')[0].split('=').slice(1).join('=');
  const { decode } = await import('next-auth/jwt');
  const token = await decode({ token: raw, secret: authSecret() });
  try {
    await authOptions.callbacks!.jwt!({ token: token!, user: undefined as never, account: null });
    return true;
  } catch {
    return false;
  }
}

describe('a cookie of an older session generation', () => {
  let owner: User;
  let member: User;
  let workspace: Workspace;
  beforeAll(async () => {
    owner = await person();
    member = await person();
    workspace = await workspaceOf(owner, member);
  });

  it('is refused after "sign out everywhere": 401 on the API, sign-in for pages, no renewal', async () => {
    const laptop = await sessionCookie(owner.id, workspace.id);
    const phone = await sessionCookie(owner.id, workspace.id);
    expect(await accountStatus(laptop)).toBe(200);
    expect(await pageOutcome(phone)).toBe('page');
    expect(await renews(phone)).toBe(true);

    const res = await sessionsRoute(await makeRequest('/api/account/sessions', { method: 'DELETE', headers: { cookie: laptop } }), { params: Promise.resolve({}) });
    expect(res.status).toBe(200);
    const cleared = res.headers.getSetCookie().find((c) => c.startsWith(`${sessionCookieName()}=`));
    expect(cleared, 'this browser forgets its cookie').toMatch(/^[^=]+=;.*Max-Age=0/);
    expect((await User.findByPk(owner.id))!.sessionGeneration).toBe(1);

    for (const old of [laptop, phone]) {
      expect(await accountStatus(old)).toBe(401);
      expect(await pageOutcome(old)).toBe('/signin?callbackUrl=%2Fstudio');
      expect(await renews(old), 'the session endpoint must not re-sign an ended session').toBe(false);
      const team = await teamRoute(new Request('http://localhost:3000/api/team', { headers: { cookie: old } }), { params: Promise.resolve({}) });
      expect(team.status).toBe(401);
    }
    // Signing in again (a cookie of the current generation) works; the other member was not touched.
    expect(await accountStatus(await sessionCookie(owner.id))).toBe(200);
    expect(await accountStatus(await sessionCookie(member.id, undefined, { generation: 0 }))).toBe(200);
    const audit = await AuditEvent.findOne({ where: { action: 'auth.signed_out_everywhere', actorUserId: owner.id } });
    expect(audit).not.toBeNull();
  });

  it('is refused after a password reset', async () => {
    const user = await person();
    await workspaceOf(user);
    const before = await sessionCookie(user.id);
    expect(await accountStatus(before)).toBe(200);
    const { token, hash } = newLinkToken();
    await AuthToken.create({ userId: user.id, purpose: 'reset-password', tokenHash: hash, expiresAt: new Date(Date.now() + 3600_000) });
    const res = await resetRoute(await makeRequest('/api/account/password/reset', { json: { token, password: 'gravel-harbour-cadence-1987' } }), { params: Promise.resolve({}) });
    expect(res.status).toBe(200);
    expect(await accountStatus(before)).toBe(401);
    expect(await pageOutcome(before)).toMatch(/^\/signin/);
    expect(await accountStatus(await sessionCookie(user.id))).toBe(200);
  });

  it('is refused after a staff account gets a new password from the command line (staff:add)', async () => {
    const { user } = await addStaff('desk@sessions.test', { password: 'lantern-harbour-cobalt-2026' });
    const before = await sessionCookie(user.id);
    expect(await pageOutcome(before, 'staff')).toBe('page');
    await addStaff('desk@sessions.test', { password: 'quiet-meadow-violet-2026' });
    expect(await accountStatus(before)).toBe(401);
    expect(await pageOutcome(before, 'staff')).toBe('/signin?callbackUrl=%2Fsupport');
  });

  it("is refused for a suspended workspace's members; staff and other workspaces keep theirs", async () => {
    const staff = await person({ staff: true });
    const a = await person();
    const b = await person();
    const outsider = await person();
    const suspended = await workspaceOf(a, b);
    await workspaceOf(outsider);
    const cookies = { a: await sessionCookie(a.id), b: await sessionCookie(b.id), outsider: await sessionCookie(outsider.id), staff: await sessionCookie(staff.id) };

    const res = await suspendRoute(await makeRequest(`/api/support/workspaces/${suspended.id}/suspend`, { userId: staff.id, json: { reason: 'Card testing through the calculators.' } }), { params: Promise.resolve({ id: String(suspended.id) }) });
    expect(res.status).toBe(200);
    expect(await accountStatus(cookies.a)).toBe(401);
    expect(await accountStatus(cookies.b)).toBe(401);
    expect(await accountStatus(cookies.outsider)).toBe(200);
    expect(await accountStatus(cookies.staff)).toBe(200);
    expect(await pageOutcome(cookies.staff, 'staff')).toBe('page');
    const audit = await AuditEvent.findOne({ where: { action: 'support.workspace_suspended', targetId: String(suspended.id) } });
    expect(audit!.detail).toMatchObject({ sessionsEnded: 2 });
  });
});

describe('cookies the guard refuses on their own', () => {
  it('a cookie from before session generations (no `gen` claim)', async () => {
    const user = await person();
    const legacy = await encode({ token: { uid: user.id, sub: String(user.id) }, secret: authSecret() });
    expect(await accountStatus(`${sessionCookieName()}=${legacy}`)).toBe(401);
    expect(await accountStatus(await sessionCookie(user.id))).toBe(200);
  });

  it('a sign-in older than the absolute limit, however often renewed', async () => {
    const user = await person();
    const now = Math.floor(Date.now() / 1000);
    expect(await accountStatus(await sessionCookie(user.id, undefined, { authTime: now - SESSION_ABSOLUTE_MAX_S + 600 }))).toBe(200);
    const stale = await sessionCookie(user.id, undefined, { authTime: now - SESSION_ABSOLUTE_MAX_S - 1 });
    expect(await accountStatus(stale)).toBe(401);
    expect(await renews(stale)).toBe(false);
  });

  it('a cookie signed with another secret', async () => {
    const user = await person();
    expect(await accountStatus(await sessionCookie(user.id, undefined, { secret: 'another-secret-of-plenty-of-characters-xyz' }))).toBe(401);
  });
});

describe('session lifetime', () => {
  it('is 12 hours for the cookie and the JWT inside it; a sign-in writes the generation', async () => {
    expect(SESSION_MAX_AGE_S).toBe(12 * 3600);
    expect(authOptions.session?.maxAge).toBe(SESSION_MAX_AGE_S);
    expect(authOptions.jwt?.maxAge, "next-auth's JWT default is 30 days, apart from the session's").toBe(SESSION_MAX_AGE_S);
    const user = await person();
    await User.increment('sessionGeneration', { by: 3, where: { id: user.id } });
    const token = await authOptions.callbacks!.jwt!({ token: { sub: String(user.id) }, user: { id: String(user.id), sessionGeneration: 3 } as never, account: null });
    expect(token).toMatchObject({ uid: user.id, gen: 3 });
    expect(Math.abs(Number(token.authTime) - Date.now() / 1000)).toBeLessThan(5);
  });
});

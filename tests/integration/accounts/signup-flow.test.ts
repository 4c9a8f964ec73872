import { beforeEach, describe, expect, it } from 'vitest';
import { makeRequest } from '../../helpers/auth';
import { POST as signUpRoute } from '@/app/api/account/signup/route';
import { POST as verifyRoute } from '@/app/api/account/verify/route';
import { POST as resendRoute } from '@/app/api/account/verify/resend/route';
import { POST as forgotRoute } from '@/app/api/account/password/forgot/route';
import { POST as resetRoute } from '@/app/api/account/password/reset/route';
import { GET as meRoute } from '@/app/api/account/route';
import { authorizeCredentials, SIGNIN_LIMITS } from '@/lib/auth/credentials';
import { SIGN_UP_ANSWER } from '@/lib/accounts/signup';
import { addStaff } from '@/lib/accounts/staff';
import { hashToken } from '@/lib/accounts/tokens';
import { rateLimitTesting } from '@/lib/rate-limit';
import { AuditEvent, AuthToken, Membership, Subscription, User, Workspace } from '@/models';
import { linkToken, useMailSink } from './mail-helpers';

const sink = useMailSink();
const ctx = { params: Promise.resolve({}) };
beforeEach(() => rateLimitTesting.clear());

async function signUp(body: Record<string, unknown>, headers: Record<string, string> = {}) {
  return signUpRoute(await makeRequest('/api/account/signup', { json: body, headers }), ctx);
}

describe('sign-up → verification mail → verify → sign in', () => {
  const person = { name: 'Ines Varga', email: 'Ines@Example.test', password: 'pedal-power-42', workspaceName: 'Hill Climbers' };

  it('creates user, owned workspace and free plan, mails a link that verifies the address', async () => {
    const res = await signUp(person);
    expect(res.status).toBe(202);
    expect(await res.json()).toEqual(SIGN_UP_ANSWER);
    // Nothing about the new account in the answer: a taken address answers the same.
    expect(res.headers.get('set-cookie')).toBeNull();

    const user = (await User.findOne({ where: { email: 'ines@example.test' } }))!;
    expect(user.isStaff).toBe(false);
    expect(user.emailVerifiedAt).toBeNull();
    expect(user.passwordHash).toMatch(/^\$2[aby]\$10\$/);
    const membership = (await Membership.findOne({ where: { userId: user.id } }))!;
    expect(membership.role).toBe('owner');
    expect((await Workspace.findByPk(membership.workspaceId))!.name).toBe('Hill Climbers');
    expect((await Subscription.findOne({ where: { workspaceId: membership.workspaceId } }))!.plan).toBe('sketch');

    // Not verified yet: the password is right but sign-in is refused with 'unverified'.
    await expect(authorizeCredentials({ email: person.email, password: person.password })).rejects.toThrow('unverified');

    const mail = await sink.mailTo('ines@example.test', 'verify-email');
    expect(mail.subject).toMatch(/confirm/i);
    const token = linkToken(mail, '/verify');
    expect(token.length).toBeGreaterThan(30);
    // Only the hash is stored.
    const stored = (await AuthToken.findOne({ where: { userId: user.id, purpose: 'verify-email' } }))!;
    expect(stored.tokenHash).toBe(hashToken(token));
    expect(stored.tokenHash).not.toContain(token);

    const verified = await verifyRoute(await makeRequest('/api/account/verify', { json: { token } }), ctx);
    expect(verified.status).toBe(200);
    expect((await User.findByPk(user.id))!.emailVerifiedAt).not.toBeNull();

    const signedIn = await authorizeCredentials({ email: 'ines@example.test', password: person.password });
    expect(signedIn).toMatchObject({ id: String(user.id), email: 'ines@example.test' });
    expect(await authorizeCredentials({ email: 'ines@example.test', password: 'not-the-password' })).toBeNull();
    expect(await AuditEvent.count({ where: { action: 'auth.signin_failed' } })).toBe(1);

    const me = await meRoute(await makeRequest('/api/account', { userId: user.id }), ctx);
    expect((await me.json()).workspaces).toEqual([expect.objectContaining({ name: 'Hill Climbers', role: 'owner' })]);
  });

  it('answers a taken address exactly like a new one, and mails the holder instead', async () => {
    const fresh = await signUp({ ...person, email: 'someone-new@example.test' });
    const taken = await signUp({ ...person, name: 'Not Ines', password: 'other-saddle-quartz-9', workspaceName: 'Grab' });
    expect(taken.status).toBe(fresh.status);
    expect(taken.status).toBe(202);
    expect(await taken.json()).toEqual(await fresh.json());
    expect([...taken.headers.keys()].sort()).toEqual([...fresh.headers.keys()].sort());

    // The holder hears about it, with ways in; nothing about the account changed.
    const mail = await sink.mailTo('ines@example.test', 'signup-existing');
    expect(mail.subject).toMatch(/tried to sign up/i);
    expect(mail.text).toContain('no new one was made');
    expect(mail.links.map((l) => new URL(l).pathname)).toEqual(expect.arrayContaining(['/signin', '/forgot-password']));
    expect(await User.count({ where: { email: 'ines@example.test' } })).toBe(1);
    const user = (await User.findOne({ where: { email: 'ines@example.test' } }))!;
    expect(await authorizeCredentials({ email: 'ines@example.test', password: person.password })).toMatchObject({ id: String(user.id) });
    expect(await Workspace.count({ where: { name: 'Grab' } })).toBe(0);
    expect(await AuditEvent.count({ where: { action: 'account.signup_address_taken', targetId: String(user.id) } })).toBe(1);
    // The visitor's mail never mentions the other account: the new address got a confirmation.
    await sink.mailTo('someone-new@example.test', 'verify-email');
  });

  it('refuses common and personal passwords with a 422 on the password field, before looking at the address', async () => {
    const cases: [Record<string, string>, RegExp][] = [
      [{ password: 'password1234' }, /too easy to guess/],
      [{ password: 'qwertyuiop12' }, /too easy to guess/],
      [{ password: 'iloveyou2026' }, /too easy to guess/],
      [{ email: 'ines.varga@example.test', password: 'ines.varga@example.test' }, /e-mail address/],
      [{ email: 'climber@example.test', password: 'climber-2026!' }, /e-mail address/],
      [{ name: 'Ines Varga', email: 'iv@example.test', password: 'InesVarga-1990' }, /your name/],
      [{ name: 'Ines Varga', email: 'iv@example.test', password: 'varga ines 2026' }, /your name/],
    ];
    for (const [change, why] of cases) {
      rateLimitTesting.clear();
      const res = await signUp({ ...person, email: 'weak-new@example.test', ...change });
      expect(res.status, change.password).toBe(422);
      const error = (await res.json()).error;
      expect(error.issues).toEqual([{ field: 'password', message: expect.stringMatching(why) }]);
      expect(error.issues[0].message).toMatch(/Choose one|Add another word|unrelated words/);
    }
    // A taken address gets the same refusal: the check comes before the lookup, so it reveals nothing.
    for (const [password, why] of [['password1234', /too easy to guess/], ['ines@example.test!', /e-mail address/], ['Ines-Varga-2026', /your name/]] as const) {
      const onTaken = await signUp({ ...person, password });
      const onNew = await signUp({ ...person, email: 'ines@example.org', password: password.replace('example.test', 'example.org') });
      expect([onTaken.status, onNew.status]).toEqual([422, 422]);
      expect((await onTaken.json()).error.issues).toEqual([{ field: 'password', message: expect.stringMatching(why) }]);
      expect((await onNew.json()).error.issues).toEqual([{ field: 'password', message: expect.stringMatching(why) }]);
    }
    expect(await User.count({ where: { email: ['weak-new@example.test', 'ines.varga@example.test', 'climber@example.test', 'iv@example.test', 'ines@example.org'] } })).toBe(0);
  });

  it('answers 422 naming each bad field', async () => {
    const res = await signUp({ name: '', email: 'nope', password: 'short', workspaceName: 'x' });
    expect(res.status).toBe(422);
    const fields = (await res.json()).error.issues.map((i: { field: string }) => i.field).sort();
    expect(fields).toEqual(['email', 'name', 'password', 'workspaceName']);
  });

  it('rejects bad and expired verification links', async () => {
    const bad = await verifyRoute(await makeRequest('/api/account/verify', { json: { token: 'x'.repeat(40) } }), ctx);
    expect(bad.status).toBe(404);
    await signUp({ ...person, email: 'late@example.test' });
    const mail = await sink.mailTo('late@example.test', 'verify-email');
    const token = linkToken(mail, '/verify');
    await AuthToken.update({ expiresAt: new Date(Date.now() - 1000) }, { where: { tokenHash: hashToken(token) } });
    const expired = await verifyRoute(await makeRequest('/api/account/verify', { json: { token } }), ctx);
    expect(expired.status).toBe(410);
    // A new link replaces the expired one.
    const resend = await resendRoute(await makeRequest('/api/account/verify/resend', { json: { email: 'late@example.test' } }), ctx);
    expect(resend.status).toBe(202);
    const fresh = await import('@/lib/fakes/smtp').then((m) => m.waitForMail(sink.dir(), (x) => x.to.includes('late@example.test') && linkToken(x, '/verify') !== token));
    const ok = await verifyRoute(await makeRequest('/api/account/verify', { json: { token: linkToken(fresh, '/verify') } }), ctx);
    expect(ok.status).toBe(200);
  });
});

describe('staff cannot sign up', () => {
  it('answers a staff address like any other and never makes a staff account from a sign-up body', async () => {
    const { user: staff } = await addStaff('desk@partwise.test', { password: 'staff-password-1' });
    const taken = await signUp({ name: 'Mallory', email: 'desk@partwise.test', password: 'grab-the-helm-1', workspaceName: 'Takeover' });
    expect(taken.status).toBe(202);
    expect(await taken.json()).toEqual(SIGN_UP_ANSWER);
    await sink.mailTo('desk@partwise.test', 'signup-existing');
    expect((await User.findByPk(staff.id))!.isStaff).toBe(true);
    expect(await Membership.count({ where: { userId: staff.id } })).toBe(0);

    const sneaky = await signUp({ name: 'Mallory', email: 'mallory@example.test', password: 'grab-the-helm-1', workspaceName: 'Takeover', isStaff: true });
    expect(sneaky.status).toBe(202);
    expect((await User.findOne({ where: { email: 'mallory@example.test' } }))!.isStaff).toBe(false);
  });

  it('staff:add refuses to promote a customer address', async () => {
    await expect(addStaff('mallory@example.test')).rejects.toThrow(/customer account/);
  });
});

describe('failed sign-ins are limited per account and per address', () => {
  it('locks an account after repeated failures, audits each, and lets a reset lift it', async () => {
    await User.create({ email: 'kai@example.test', name: 'Kai', passwordHash: await import('bcryptjs').then((b) => b.hash('right-password-1', 4)), emailVerifiedAt: new Date() });
    for (let i = 0; i < SIGNIN_LIMITS.perAccount.limit; i++) {
      expect(await authorizeCredentials({ email: 'kai@example.test', password: `wrong-${i}` }, { 'x-forwarded-for': `10.0.0.${i}` })).toBeNull();
    }
    // Even the right password is refused while locked, from any address.
    await expect(authorizeCredentials({ email: 'kai@example.test', password: 'right-password-1' }, { 'x-forwarded-for': '10.9.9.9' })).rejects.toThrow('rate_limited');
    const audits = await AuditEvent.findAll({ where: { action: 'auth.signin_failed', targetId: String((await User.findOne({ where: { email: 'kai@example.test' } }))!.id) } });
    expect(audits.length).toBeGreaterThanOrEqual(SIGNIN_LIMITS.perAccount.limit);
    expect(audits[0].address).toBe('10.0.0.0');

    const forgot = await forgotRoute(await makeRequest('/api/account/password/forgot', { json: { email: 'kai@example.test' } }), ctx);
    expect(forgot.status).toBe(202);
    const token = linkToken(await sink.mailTo('kai@example.test', 'reset-password'), '/reset-password');
    // A guessable new password is refused on the field and leaves the link usable.
    for (const weak of ['password1234', 'kai@example.test-1']) {
      const refused = await resetRoute(await makeRequest('/api/account/password/reset', { json: { token, password: weak } }), ctx);
      expect(refused.status).toBe(422);
      expect((await refused.json()).error.issues).toEqual([expect.objectContaining({ field: 'password', message: expect.stringMatching(/too easy to guess|e-mail address/) })]);
    }
    const reset = await resetRoute(await makeRequest('/api/account/password/reset', { json: { token, password: 'brand-new-password' } }), ctx);
    expect(reset.status).toBe(200);
    expect(await authorizeCredentials({ email: 'kai@example.test', password: 'brand-new-password' })).toMatchObject({ email: 'kai@example.test' });
    const again = await resetRoute(await makeRequest('/api/account/password/reset', { json: { token, password: 'another-password-2' } }), ctx);
    expect(again.status).toBe(404);
  });

  it('limits one address trying many accounts', async () => {
    const headers = { 'x-forwarded-for': '192.0.2.7' };
    for (let i = 0; i < SIGNIN_LIMITS.perAddress.limit; i++) {
      expect(await authorizeCredentials({ email: `nobody${i}@example.test`, password: 'guess-guess' }, headers)).toBeNull();
    }
    await expect(authorizeCredentials({ email: 'kai@example.test', password: 'brand-new-password' }, headers)).rejects.toThrow('rate_limited');
    // Another address is unaffected.
    expect(await authorizeCredentials({ email: 'kai@example.test', password: 'brand-new-password' }, { 'x-forwarded-for': '192.0.2.8' })).not.toBeNull();
  });

  it('answers a reset request for an unknown address the same way, sending nothing', async () => {
    const res = await forgotRoute(await makeRequest('/api/account/password/forgot', { json: { email: 'ghost@example.test' } }), ctx);
    expect(res.status).toBe(202);
    await new Promise((r) => setTimeout(r, 200));
    const { readMailbox } = await import('@/lib/fakes/smtp');
    expect(readMailbox(sink.dir()).some((m) => m.to.includes('ghost@example.test'))).toBe(false);
  });
});

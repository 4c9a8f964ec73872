import bcrypt from 'bcryptjs';
import { afterEach, beforeAll, beforeEach, describe, expect, it, vi } from 'vitest';
import { requestPasswordReset } from '@/lib/accounts/password';
import { signUp } from '@/lib/accounts/signup';
import { settleAfterResponse } from '@/lib/accounts/after-response';
import { rateLimitTesting } from '@/lib/rate-limit';
import { AuthToken, MailMessage, User, sequelize } from '@/models';
import { useMailSink } from './mail-helpers';

/**
 * Whether an address has an account must not show in the answer's timing either. Not
 * measured with a clock (that would flake): the request path is checked to do the same
 * work for a known and an unknown address — the same SQL, the same password hashing —
 * with the account-specific writes and mail left for after the answer.
 */
useMailSink();
beforeEach(() => rateLimitTesting.clear());
afterEach(() => vi.restoreAllMocks());

let known: User;
beforeAll(async () => {
  known = await User.create({ email: 'known@example.test', name: 'Known Rider', passwordHash: await bcrypt.hash('saddle-quartz-lantern', 4), emailVerifiedAt: new Date() });
});

/** The SQL a call runs before it returns, with literal values blanked out. */
async function statementsOf(call: () => Promise<unknown>): Promise<string[]> {
  await settleAfterResponse();
  const seen: string[] = [];
  const original = sequelize.query.bind(sequelize);
  const spy = vi.spyOn(sequelize, 'query').mockImplementation(((sql: unknown, options?: unknown) => {
    seen.push(String(typeof sql === 'object' && sql && 'query' in sql ? (sql as { query: string }).query : sql).replace(/'(?:[^']|'')*'/g, "'?'").replace(/\b\d+\b/g, '0'));
    return (original as (s: unknown, o?: unknown) => Promise<unknown>)(sql, options);
  }) as typeof sequelize.query);
  try {
    await call();
  } finally {
    spy.mockRestore();
  }
  return seen;
}

describe('forgot password: the same work for known and unknown addresses', () => {
  it('runs the same statements before answering, and only reads', async () => {
    const forKnown = await statementsOf(() => requestPasswordReset('known@example.test'));
    const forUnknown = await statementsOf(() => requestPasswordReset('nobody@example.test'));
    expect(forKnown.length).toBeGreaterThan(0);
    expect(forKnown).toEqual(forUnknown);
    for (const sql of forKnown) expect(sql).toMatch(/^SELECT/);
  });

  it('writes the token, the mail and the audit entry only after the answer', async () => {
    const onPath = await statementsOf(() => requestPasswordReset('known@example.test'));
    expect(onPath.filter((sql) => /^(INSERT|UPDATE|DELETE)/.test(sql))).toEqual([]);
    await settleAfterResponse();
    expect(await AuthToken.count({ where: { userId: known.id, purpose: 'reset-password', usedAt: null } })).toBe(1);
    expect(await MailMessage.count({ where: { to: 'known@example.test', kind: 'reset-password' } })).toBeGreaterThan(0);

    await requestPasswordReset('still-nobody@example.test');
    await settleAfterResponse();
    expect(await MailMessage.count({ where: { to: 'still-nobody@example.test' } })).toBe(0);
  });
});

describe('sign-up: the same work for new and taken addresses', () => {
  const input = (email: string) => ({ name: 'Test Rider', email, password: 'heron-gravel-lantern-8', workspaceName: 'Loop' });

  it('hashes the password either way and sends its mail only after the answer', async () => {
    for (const email of ['known@example.test', 'brand-new@example.test']) {
      await settleAfterResponse();
      const mailsBefore = await MailMessage.count({ where: { to: email } });
      const hash = vi.spyOn(bcrypt, 'hash');
      const onPath = await statementsOf(() => signUp(input(email)));
      expect(hash, email).toHaveBeenCalledTimes(1);
      expect(hash.mock.calls[0][0]).toBe('heron-gravel-lantern-8');
      hash.mockRestore();
      // (Delivery of earlier mail may update the outbox meanwhile; a new row or token is what would tell.)
      const written = new RegExp(`^(INSERT INTO \`?${MailMessage.getTableName()}|(INSERT INTO|DELETE FROM) \`?${AuthToken.getTableName()})\\b`);
      expect(onPath.length).toBeGreaterThan(0);
      expect(onPath.filter((sql) => written.test(sql)), `${email}: no mail or token written on the request path`).toEqual([]);
      await settleAfterResponse();
      expect(await MailMessage.count({ where: { to: email } }), `${email}: mail after the answer`).toBe(mailsBefore + 1);
    }
    const kinds = (await MailMessage.findAll({ where: { to: ['known@example.test', 'brand-new@example.test'] } })).map((m) => `${m.to} ${m.kind}`);
    expect(kinds).toEqual(expect.arrayContaining(['known@example.test signup-existing', 'brand-new@example.test verify-email']));
    // The known account is untouched: same password, one account.
    expect(await bcrypt.compare('saddle-quartz-lantern', (await User.findByPk(known.id))!.passwordHash)).toBe(true);
    expect(await User.count({ where: { email: 'known@example.test' } })).toBe(1);
  });
});

import { describe, expect, it } from 'vitest';
import { assertStrongPassword, judgePassword, MIN_PASSWORD_SCORE } from '@/lib/accounts/password-strength';
import { AppError } from '@/lib/errors';
import { DEMO_USERS } from '@/lib/demo/accounts';

/** zxcvbn-ts with the common and English dictionaries, score ≥ 3, plus the person's own words. */
const ines = { email: 'ines.varga@example.test', name: 'Ines Varga' };

describe('judgePassword', () => {
  it.each([
    ['password1234', /too easy to guess: it is a small change to a commonly used password/],
    ['1234567890', /too easy to guess/],
    ['qwertyuiop', /too easy to guess/],
    ['iloveyou12', /too easy to guess/],
    ['Password1!', /too easy to guess/],
    ['letmein2026', /too easy to guess/],
    ['aaaaaaaaaaaa', /too easy to guess/],
    ['abcdefghijkl', /too easy to guess/],
  ])('refuses the common password %s, saying why and what helps', (password, why) => {
    const verdict = judgePassword(password, ines);
    expect(verdict.ok).toBe(false);
    expect(verdict.score).toBeLessThan(MIN_PASSWORD_SCORE);
    expect(verdict.message).toMatch(why);
    expect(verdict.message).toMatch(/unrelated words/);
  });

  it.each([
    ['the address', 'ines.varga@example.test', /contains your e-mail address/],
    ['the address with more', 'my-ines.varga@example.test-key', /contains your e-mail address/],
    ['the local part', 'ines.varga-rides', /contains your name|first part of your e-mail/],
    ['the name', 'Ines Varga 1990', /your name/],
    ['the name without spaces', 'inesvarga!!2026', /your name/],
    ['the name reordered', 'varga.ines.2026', /made of your name/],
  ])('refuses a password containing %s', (_label, password, why) => {
    const verdict = judgePassword(password, ines);
    expect(verdict.ok).toBe(false);
    expect(verdict.message).toMatch(why);
  });

  it('only refuses an address part that is long enough to mean something', () => {
    expect(judgePassword('lantern-quartz-heron', { email: 'al@example.test', name: 'Al' }).ok).toBe(true);
    expect(judgePassword('bob-lantern-quartz', { email: 'bob@example.test', name: 'Robert Lee' }).ok).toBe(false);
  });

  it.each(['pedal-power-42', 'gravel-heron-tuesday-41', 'correct horse battery staple', 'climb-every-hill-7'])('accepts %s', (password) => {
    const verdict = judgePassword(password, ines);
    expect(verdict).toMatchObject({ ok: true });
    expect(verdict.score).toBeGreaterThanOrEqual(MIN_PASSWORD_SCORE);
  });

  it('the seeded demo accounts would pass the check too', () => {
    for (const user of Object.values(DEMO_USERS)) expect(judgePassword(user.password, user), user.email).toMatchObject({ ok: true });
  });
});

describe('assertStrongPassword', () => {
  it('throws a 422 with one issue on the password field', () => {
    let error: unknown;
    try {
      assertStrongPassword('password1234', ines);
    } catch (e) {
      error = e;
    }
    expect(error).toBeInstanceOf(AppError);
    const app = error as AppError;
    expect(app.status).toBe(422);
    expect(app.issues).toEqual([{ field: 'password', message: expect.stringMatching(/too easy to guess/) }]);
    expect(() => assertStrongPassword('gravel-heron-tuesday-41', ines)).not.toThrow();
  });
});

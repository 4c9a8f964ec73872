import { describe, expect, it } from 'vitest';
import { extractLinks } from '@/lib/fakes/smtp';
import { appLink, invitationMail, signUpAttemptMail, verificationMail } from '@/lib/mail/templates';
import { signUpSchema } from '@/lib/accounts/schemas';

describe('account mail templates', () => {
  it('builds links on NEXTAUTH_URL with the token as a query parameter', () => {
    process.env.NEXTAUTH_URL = 'https://partwise.example/';
    expect(appLink('/verify', { token: 'a+b/c' })).toBe('https://partwise.example/verify?token=a%2Bb%2Fc');
  });

  it('puts the link in the text and escapes names in the HTML', () => {
    const mail = invitationMail({ email: 'x@example.test', workspaceName: '<Hill & Dale>', inviterName: 'Olga', role: 'member', link: 'http://localhost:3000/invite?token=abc', expiresAt: new Date('2027-01-08T00:00:00Z') });
    expect(mail.kind).toBe('invitation');
    expect(mail.text).toContain('\nhttp://localhost:3000/invite?token=abc\n');
    expect(mail.text).toContain('2027-01-08');
    expect(mail.html).toContain('&lt;Hill &amp; Dale&gt;');
    expect(mail.html).not.toContain('<Hill');
    expect(extractLinks(mail.text, mail.html)).toEqual(['http://localhost:3000/invite?token=abc']);
  });

  it('verification mail names the person and the link', () => {
    const mail = verificationMail({ email: 'a@example.test', name: 'Ada' }, 'http://h/verify?token=t');
    expect(mail).toMatchObject({ to: 'a@example.test', kind: 'verify-email' });
    expect(mail.text).toMatch(/^Hello Ada,/);
  });
});

describe('sign-up attempt mail', () => {
  it('tells the holder nothing changed and links to sign-in and a new password', () => {
    const mail = signUpAttemptMail({ email: 'ada@example.test', name: 'Ada <Admin>' }, { signIn: 'http://h/signin?email=ada%40example.test', reset: 'http://h/forgot-password' });
    expect(mail).toMatchObject({ to: 'ada@example.test', kind: 'signup-existing' });
    expect(mail.subject).toMatch(/tried to sign up/);
    expect(mail.text).toMatch(/^Hello Ada <Admin>,/);
    expect(mail.text).toContain('no new one was made and nothing about yours changed');
    expect(mail.html).toContain('Ada &lt;Admin&gt;');
    expect(extractLinks(mail.text, mail.html).sort()).toEqual(['http://h/forgot-password', 'http://h/signin?email=ada%40example.test']);
  });
});

describe('sign-up schema', () => {
  it('normalises the address and drops unknown keys such as isStaff', () => {
    const parsed = signUpSchema.parse({ name: ' Ada ', email: ' Ada@Example.TEST ', password: 'long-enough-1', workspaceName: 'Loop', isStaff: true });
    expect(parsed).toEqual({ name: 'Ada', email: 'ada@example.test', password: 'long-enough-1', workspaceName: 'Loop' });
  });

  it('gives one clear message for a short password', () => {
    const r = signUpSchema.safeParse({ name: 'A', email: 'a@b.co', password: 'short', workspaceName: 'Loop' });
    expect(r.success).toBe(false);
    expect(r.error!.issues.map((i) => i.message)).toEqual(['Use at least 10 characters.']);
  });
});

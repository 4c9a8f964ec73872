import { formatCount, formatFixed, formatPercent } from '@/lib/format';
import type { OutgoingMail } from './index';

/**
 * The account mails, in Partwise's own words. Each returns a ready OutgoingMail; the
 * text part carries the link on its own line so every mail client shows it.
 */
export function appLink(pathname: string, query: Record<string, string> = {}): string {
  const base = (process.env.NEXTAUTH_URL ?? 'http://localhost:3000').replace(/\/+$/, '');
  const url = new URL(pathname, `${base}/`);
  for (const [k, v] of Object.entries(query)) url.searchParams.set(k, v);
  return url.toString();
}

function escapeHtml(s: string): string {
  return s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);
}

function layout(heading: string, paragraphs: string[], link: { href: string; label: string }, footer: string, secondLink?: { href: string; label: string }): string {
  const body = paragraphs.map((p) => `<p style="margin:0 0 14px">${escapeHtml(p)}</p>`).join('');
  return `<!doctype html><html><body style="margin:0;background:#faf7f2;font-family:system-ui,sans-serif;color:#1d2330">
<div style="max-width:520px;margin:0 auto;padding:28px 20px">
<p style="font-weight:700;font-size:18px;margin:0 0 18px">Partwise</p>
<div style="background:#fff;border-radius:14px;padding:24px">
<h1 style="font-size:20px;margin:0 0 14px">${escapeHtml(heading)}</h1>${body}
<p style="margin:20px 0"><a href="${escapeHtml(link.href)}" style="background:#2f6f5e;color:#fff;padding:10px 18px;border-radius:999px;text-decoration:none;font-weight:700">${escapeHtml(link.label)}</a></p>
<p style="margin:0;font-size:13px;color:#4a5366">Or paste this address into your browser: ${escapeHtml(link.href)}</p>${secondLink ? `\n<p style="margin:14px 0 0"><a href="${escapeHtml(secondLink.href)}" style="color:#2f6f5e;font-weight:700">${escapeHtml(secondLink.label)}</a></p>` : ''}
</div><p style="font-size:12px;color:#8a91a0;margin:16px 4px">${escapeHtml(footer)}</p></div></body></html>`;
}

export function verificationMail(to: { email: string; name: string }, link: string): OutgoingMail {
  const hello = to.name ? `Hello ${to.name},` : 'Hello,';
  return {
    to: to.email,
    kind: 'verify-email',
    subject: 'Confirm your e-mail for Partwise',
    text: `${hello}\n\nPlease confirm that this address is yours, so you can sign in to Partwise:\n\n${link}\n\nThe link works for 48 hours. If you did not create a Partwise account, ignore this mail and nothing happens.\n`,
    html: layout('Confirm your e-mail', [hello, 'Please confirm that this address is yours, so you can sign in to Partwise. The link works for 48 hours.'], { href: link, label: 'Confirm my e-mail' }, 'If you did not create a Partwise account, ignore this mail and nothing happens.'),
  };
}

export function passwordResetMail(to: { email: string; name: string }, link: string): OutgoingMail {
  const hello = to.name ? `Hello ${to.name},` : 'Hello,';
  return {
    to: to.email,
    kind: 'reset-password',
    subject: 'Choose a new Partwise password',
    text: `${hello}\n\nSomeone (hopefully you) asked to choose a new password for this Partwise account:\n\n${link}\n\nThe link works for one hour and only once. If you did not ask, ignore this mail; your password stays as it is.\n`,
    html: layout('Choose a new password', [hello, 'Someone (hopefully you) asked to choose a new password for this Partwise account. The link works for one hour and only once.'], { href: link, label: 'Choose a new password' }, 'If you did not ask, ignore this mail; your password stays as it is.'),
  };
}

/**
 * To the holder of an address someone used on the sign-up form: nothing changed, and
 * here is how to get in. The visitor who typed it only ever sees "check your inbox".
 */
export function signUpAttemptMail(to: { email: string; name: string }, links: { signIn: string; reset: string }): OutgoingMail {
  const hello = to.name ? `Hello ${to.name},` : 'Hello,';
  const what = `Someone just tried to create a Partwise account with this address (${to.email}). It already has an account, so no new one was made and nothing about yours changed.`;
  return {
    to: to.email,
    kind: 'signup-existing',
    subject: 'Someone tried to sign up to Partwise with your address',
    text: `${hello}\n\n${what}\n\nIf that was you, sign in here:\n\n${links.signIn}\n\nForgot your password? Choose a new one here:\n\n${links.reset}\n\nIf it was not you, ignore this mail; your account and password stay as they are.\n`,
    html: layout(
      'You already have an account',
      [hello, what],
      { href: links.signIn, label: 'Sign in to Partwise' },
      'If it was not you, ignore this mail; your account and password stay as they are.',
      { href: links.reset, label: 'Forgot your password? Choose a new one' },
    ),
  };
}

export function invitationMail(opts: { email: string; workspaceName: string; inviterName: string; role: string; link: string; expiresAt: Date }): OutgoingMail {
  const who = opts.inviterName || 'A colleague';
  const until = opts.expiresAt.toISOString().slice(0, 10);
  return {
    to: opts.email,
    kind: 'invitation',
    subject: `${who} invited you to ${opts.workspaceName} on Partwise`,
    text: `Hello,\n\n${who} invited you to join the workspace "${opts.workspaceName}" on Partwise as ${opts.role === 'owner' ? 'an owner' : 'a member'}.\n\nJoin here:\n\n${opts.link}\n\nThe invitation is valid until ${until}. If you were not expecting it, ignore this mail.\n`,
    html: layout(`Join ${opts.workspaceName}`, [`${who} invited you to join the workspace “${opts.workspaceName}” on Partwise as ${opts.role === 'owner' ? 'an owner' : 'a member'}.`, `The invitation is valid until ${until}.`], { href: opts.link, label: 'Accept the invitation' }, 'If you were not expecting this invitation, ignore this mail.'),
  };
}

/** Fair use of scoring: a calculator reached one of its plan's burst limits (sent once per calculator per hour). */
export function calculatorBurstMail(opts: { email: string; workspaceName: string; calculatorTitle: string; embedId: number; planName: string; answers: number; windowText: string; link: string }): OutgoingMail {
  const lead = `Your calculator “${opts.calculatorTitle}” in ${opts.workspaceName} was asked for more answers than the ${opts.planName} plan allows one calculator in ${opts.windowText} (${formatCount(opts.answers)}).`;
  const what = 'We turned away the extra requests with a neutral “busy, try again shortly” notice, so they did not use up your monthly answers. The calculator keeps answering as soon as the rate falls; other visitors only had to wait a little.';
  const check = 'If you expected a rush (a newsletter, a class, an event), nothing needs doing. If not, someone may be sending requests automatically: you can rotate the calculator’s address in Partwise Studio (the old address stops answering) and share the new one.';
  return {
    to: opts.email,
    kind: 'calculator-burst',
    subject: `“${opts.calculatorTitle}” is getting more requests than usual`,
    text: `Hello,\n\n${lead}\n\n${what}\n\n${check}\n\n${opts.link}\n\nYou hear from us at most once an hour per calculator about this.\n`,
    html: layout('A burst of requests', [lead, what, check], { href: opts.link, label: 'Open the calculator' }, 'You hear from us at most once an hour per calculator about this.'),
  };
}

/** Fair use of scoring: the workspace's answers reached the pause line, calculators now pause until next month or an upgrade. */
export function answersPausedMail(opts: { email: string; workspaceName: string; planName: string; pauseAt: number; period: string; link: string }): OutgoingMail {
  const lead = `The calculators of ${opts.workspaceName} have given ${formatCount(opts.pauseAt)} answers in ${opts.period}: the ${opts.planName} plan’s monthly answers and the short grace after them.`;
  const what = 'They now show visitors a neutral “taking a short break” notice instead of answering. They answer again on the first of next month, or at once after an upgrade.';
  return {
    to: opts.email,
    kind: 'answers-paused',
    subject: `${opts.workspaceName}: calculators paused for the rest of ${opts.period}`,
    text: `Hello,\n\n${lead}\n\n${what}\n\n${opts.link}\n`,
    html: layout('Calculators paused', [lead, what], { href: opts.link, label: 'See plans and usage' }, 'You get this mail once a month at most, when the pause begins.'),
  };
}

/**
 * Answer insight's weekly mail to a member who asked for it: the last 7 days of a
 * calculator crossed their drift or unusual-share threshold. Drift is about the values
 * visitors entered compared with the training data, never about a person.
 */
export function insightWeeklyMail(opts: {
  email: string;
  workspaceName: string;
  calculatorTitle: string;
  answers: number;
  /** the largest field PSI of the last 7 days, or null */
  drift: number | null;
  driftBand: 'stable' | 'watch' | 'act' | null;
  driftThreshold: number;
  unusualShare: number;
  unusualThreshold: number;
  demo: boolean;
  link: string;
}): OutgoingMail {
  const lead = `Here is the last week of “${opts.calculatorTitle}” in ${opts.workspaceName}: ${formatCount(opts.answers)} answers.`;
  const lines: string[] = [];
  const drifted = opts.drift !== null && opts.drift >= opts.driftThreshold;
  if (drifted && opts.drift !== null) {
    const band = opts.driftBand === 'act' ? 'above 0.25, where common practice says to act' : opts.driftBand === 'watch' ? 'between 0.1 and 0.25, worth watching by common practice' : 'below 0.1, stable by common practice';
    lines.push(`The field that moved most has a drift (population stability index) of ${formatFixed(opts.drift, 2)}, at or above your threshold of ${formatFixed(opts.driftThreshold, 2)}: ${band}.`);
  }
  if (opts.unusualShare >= opts.unusualThreshold) {
    lines.push(`${formatPercent(opts.unusualShare)} of the answers were flagged as unlike the training data, at or above your threshold of ${formatPercent(opts.unusualThreshold)}.`);
  }
  const meaning = 'Drift compares the values visitors typed into the calculator with the data the model was fitted on, field by field. It describes the inputs as a whole, not anything about any one visitor. A steady rise can mean the calculator now reaches people unlike those in your data; refitting on newer data may help.';
  const demo = opts.demo ? ' The figures include the invented demo aggregates seeded for this calculator.' : '';
  const footer = 'You get this mail at most once a week per calculator, and only when a threshold is crossed. Change or stop it on the calculator’s insight tab.';
  return {
    to: opts.email,
    kind: 'insight-weekly',
    subject: drifted ? `“${opts.calculatorTitle}”: visitors’ inputs have drifted from the training data` : `“${opts.calculatorTitle}”: more answers than you set are unlike the training data`,
    text: `Hello,\n\n${lead}${demo}\n\n${lines.join('\n\n')}\n\n${meaning}\n\n${opts.link}\n\n${footer}\n`,
    html: layout('Your calculator’s week', [lead + demo, ...lines, meaning], { href: opts.link, label: 'Open the insight tab' }, footer),
  };
}

'use client';
import { useId, useState, type FormEvent } from 'react';
import type { Messages } from './messages';

const REASONS = ['misleading', 'impersonation', 'offensive', 'privacy', 'other'] as const;

/** "Report this calculator": a small form that goes to Partwise support, not the publisher. */
export function ReportForm({ token, hostOrigin, texts: t, englishServer }: { token: string; hostOrigin: string | null; texts: Messages['report']; englishServer: boolean }) {
  const id = useId();
  const [open, setOpen] = useState(false);
  const [state, setState] = useState<'idle' | 'sending' | 'sent'>('idle');
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [problem, setProblem] = useState('');

  // The first field with a problem takes the focus, so its error is read with it.
  const focusInvalid = (errs: Record<string, string>) => {
    const first = ['reason', 'message', 'email'].find((name) => errs[name]);
    if (first) document.getElementById(`${id}-${first}`)?.focus();
  };

  async function submit(event: FormEvent<HTMLFormElement>) {
    event.preventDefault();
    const form = new FormData(event.currentTarget);
    const body = { token, reason: String(form.get('reason') ?? ''), message: String(form.get('message') ?? '').trim(), email: String(form.get('email') ?? '').trim(), ...(hostOrigin ? { hostOrigin } : {}) };
    const errs: Record<string, string> = {};
    if (!body.reason) errs.reason = t.chooseReason;
    if (body.message.length < 10) errs.message = t.messageTooShort;
    setErrors(errs);
    if (Object.keys(errs).length) {
      focusInvalid(errs);
      return;
    }
    setState('sending');
    setProblem('');
    const res = await fetch('/api/reports', { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify(body) }).catch(() => null);
    if (res?.ok) {
      setState('sent');
      return;
    }
    setState('idle');
    const data = await res?.json().catch(() => null);
    if (res?.status === 422 && Array.isArray(data?.error?.issues)) {
      // The server words its reasons in English; other languages get the form's own sentence per field.
      const own: Record<string, string> = { reason: t.chooseReason, message: t.messageTooShort, email: t.emailInvalid };
      const fromServer = Object.fromEntries((data.error.issues as { field: string; message: string }[]).map((i) => [i.field, englishServer ? i.message : (own[i.field] ?? t.sendFailed)]));
      setErrors(fromServer);
      focusInvalid(fromServer);
    } else {
      setProblem((englishServer ? data?.error?.message : null) ?? t.sendFailed);
    }
  }

  if (state === 'sent') return <p role="status">{t.thanks}</p>;
  return (
    <div>
      <button type="button" aria-expanded={open} aria-controls={`${id}-report`} onClick={() => setOpen((o) => !o)} className="underline underline-offset-2 hover:text-ink dark:hover:text-white">
        {t.open}
      </button>
      {open && (
        <form id={`${id}-report`} onSubmit={submit} noValidate className="mt-3 space-y-3 rounded-lg border border-ink/10 p-3 text-sm dark:border-white/15" aria-label={t.open}>
          <p>{t.intro}</p>
          <div>
            <label htmlFor={`${id}-reason`} className="mb-1 block font-bold">{t.reasonLabel}</label>
            <select id={`${id}-reason`} name="reason" defaultValue="" aria-invalid={errors.reason ? true : undefined} aria-describedby={errors.reason ? `${id}-reason-error` : undefined} className="block w-full rounded-lg border border-ink/50 bg-white px-2 py-2 text-ink dark:border-white/45 dark:bg-[#1c2130] dark:text-[#f3efe7]">
              <option value="" disabled>{t.choose}</option>
              {REASONS.map((value) => (
                <option key={value} value={value}>{t.reasons[value]}</option>
              ))}
            </select>
            {errors.reason && <p id={`${id}-reason-error`} className="mt-1 font-bold text-clay-700 dark:text-[#f1a595]">{errors.reason}</p>}
          </div>
          <div>
            <label htmlFor={`${id}-message`} className="mb-1 block font-bold">{t.messageLabel}</label>
            <textarea id={`${id}-message`} name="message" rows={3} maxLength={2000} aria-invalid={errors.message ? true : undefined} aria-describedby={errors.message ? `${id}-message-error` : undefined} className="block w-full rounded-lg border border-ink/50 bg-white px-2 py-2 text-ink dark:border-white/45 dark:bg-[#1c2130] dark:text-[#f3efe7]" />
            {errors.message && <p id={`${id}-message-error`} className="mt-1 font-bold text-clay-700 dark:text-[#f1a595]">{errors.message}</p>}
          </div>
          <div>
            <label htmlFor={`${id}-email`} className="mb-1 block font-bold">{t.emailLabel}</label>
            <input id={`${id}-email`} name="email" type="email" autoComplete="email" aria-invalid={errors.email ? true : undefined} aria-describedby={errors.email ? `${id}-email-error` : undefined} className="block w-full rounded-lg border border-ink/50 bg-white px-2 py-2 text-ink dark:border-white/45 dark:bg-[#1c2130] dark:text-[#f3efe7]" />
            {errors.email && <p id={`${id}-email-error`} className="mt-1 font-bold text-clay-700 dark:text-[#f1a595]">{errors.email}</p>}
          </div>
          {problem && <p role="alert" className="font-bold text-clay-700 dark:text-[#f1a595]">{problem}</p>}
          <button type="submit" disabled={state === 'sending'} className="rounded-full px-4 py-2 font-bold ring-1 ring-current">
            {state === 'sending' ? t.sending : t.send}
          </button>
        </form>
      )}
    </div>
  );
}

'use client';

import Link from 'next/link';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { PASSWORD_HINT, signUpSchema, type SignUpInput } from '@/lib/accounts/schemas';
import { Field, FormBanner, applyServerIssues, postJson } from './form-kit';

const FIELDS = ['name', 'email', 'password', 'workspaceName'] as const;

/**
 * The server answers the same whether the address is new or already has an account
 * (no account oracle), so the success text is about the inbox, not about an account.
 */
function CheckInbox({ email, showMailSink }: { email: string; showMailSink: boolean }) {
  return (
    <div role="status" aria-labelledby="signup-sent-heading" className="space-y-3 rounded-lg bg-moss-50 px-5 py-4 text-ink ring-1 ring-moss-300">
      <h2 id="signup-sent-heading" className="font-sans text-lg font-bold">
        Check your inbox
      </h2>
      <p>
        We sent a mail to <strong>{email}</strong>. Open the link in it to confirm the address, then sign in.
      </p>
      <p className="text-sm text-ink-soft">If this address already has a Partwise account, the mail says so and tells you how to sign in or choose a new password.</p>
      <p className="text-sm text-ink-soft">
        Nothing after a few minutes? Check spam, or{' '}
        <Link className="font-bold text-moss-700 underline" href={`/verify?email=${encodeURIComponent(email)}`}>
          send the confirmation link again
        </Link>
        .
      </p>
      {showMailSink ? (
        <p className="text-sm">
          Local run: mail stays on this machine.{' '}
          <Link href="/dev/mail" className="font-bold underline">
            Open the mail sink
          </Link>
        </p>
      ) : null}
    </div>
  );
}

export function SignUpForm({ showMailSink = false, plan }: { showMailSink?: boolean; plan?: 'bench' | 'lab' }) {
  const [banner, setBanner] = useState<string | null>(null);
  const [sentTo, setSentTo] = useState<string | null>(null);
  const { register, handleSubmit, setError, formState } = useForm<SignUpInput>({ resolver: zodResolver(signUpSchema), mode: 'onTouched' });
  const { errors, isSubmitting } = formState;

  const onSubmit = handleSubmit(async (values) => {
    setBanner(null);
    const result = await postJson<{ message: string }>('/api/account/signup', plan ? { ...values, plan } : values);
    if (result.ok) {
      setSentTo(values.email);
      return;
    }
    const rest = applyServerIssues(setError, result.issues, FIELDS);
    if (rest.length || !result.issues.length) setBanner(rest.join(' ') || result.message);
  });

  if (sentTo) return <CheckInbox email={sentTo} showMailSink={showMailSink} />;

  return (
    <form onSubmit={onSubmit} noValidate className="space-y-4" aria-label="Create your account">
      {banner ? <FormBanner>{banner}</FormBanner> : null}
      <Field label="Your name" autoComplete="name" error={errors.name?.message} {...register('name')} />
      <Field label="E-mail" type="email" autoComplete="email" error={errors.email?.message} {...register('email')} />
      <Field label="Password" type="password" autoComplete="new-password" hint={PASSWORD_HINT} error={errors.password?.message} {...register('password')} />
      <Field label="Workspace name" placeholder="e.g. Riverside Cycling Club" hint="Your team's space for datasets, fits and calculators." error={errors.workspaceName?.message} {...register('workspaceName')} />
      <button type="submit" className="pw-button w-full" disabled={isSubmitting}>
        {isSubmitting ? 'Creating your account…' : 'Create account'}
      </button>
    </form>
  );
}

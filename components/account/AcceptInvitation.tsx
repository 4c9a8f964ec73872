'use client';

import Link from 'next/link';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { z } from 'zod';
import { signIn, signOut } from 'next-auth/react';
import { PASSWORD_HINT, password, personName } from '@/lib/accounts/schemas';
import type { InvitationSummary } from '@/lib/accounts/invitations';
import { Field, FormBanner, applyServerIssues, postJson } from './form-kit';

const newAccountSchema = z.object({ name: personName, password });
type NewAccount = z.infer<typeof newAccountSchema>;

export function AcceptInvitation({ token, invitation, signedInAs }: { token: string; invitation: InvitationSummary; signedInAs: string | null }) {
  const [banner, setBanner] = useState<string | null>(null);
  const [joining, setJoining] = useState(false);
  const here = `/invite?token=${encodeURIComponent(token)}`;
  const { register, handleSubmit, setError, formState } = useForm<NewAccount>({ resolver: zodResolver(newAccountSchema), mode: 'onTouched' });

  async function join(extra: Partial<NewAccount> = {}) {
    setBanner(null);
    const result = await postJson('/api/team/invitations/accept', { token, ...extra });
    if (!result.ok) {
      const rest = applyServerIssues(setError, result.issues, ['name', 'password']);
      if (rest.length || !result.issues.length) setBanner(rest.join(' ') || result.message);
      return false;
    }
    return true;
  }

  if (signedInAs && signedInAs !== invitation.email) {
    return (
      <div className="space-y-4">
        <FormBanner tone="info">
          This invitation is for <strong>{invitation.email}</strong>, but you are signed in as <strong>{signedInAs}</strong>.
        </FormBanner>
        <button type="button" className="pw-button-quiet" onClick={() => signOut({ callbackUrl: here })}>
          Sign out and continue
        </button>
      </div>
    );
  }

  if (signedInAs) {
    return (
      <div className="space-y-4">
        {banner ? <FormBanner>{banner}</FormBanner> : null}
        <button
          type="button"
          className="pw-button"
          disabled={joining}
          onClick={async () => {
            setJoining(true);
            if (await join()) window.location.assign('/studio');
            else setJoining(false);
          }}
        >
          {joining ? 'Joining…' : `Join ${invitation.workspaceName}`}
        </button>
      </div>
    );
  }

  if (invitation.accountExists) {
    return (
      <div className="space-y-4">
        <p className="text-ink-soft">You already have a Partwise account for {invitation.email}. Sign in, and you will come back here to join.</p>
        <Link className="pw-button" href={`/signin?email=${encodeURIComponent(invitation.email)}&callbackUrl=${encodeURIComponent(here)}`}>
          Sign in to accept
        </Link>
      </div>
    );
  }

  const onSubmit = handleSubmit(async (values) => {
    if (!(await join(values))) return;
    const signedIn = await signIn('credentials', { email: invitation.email, password: values.password, redirect: false });
    window.location.assign(signedIn?.ok && !signedIn.error ? '/studio' : '/signin');
  });

  return (
    <form onSubmit={onSubmit} noValidate className="space-y-4" aria-label="Create your account and join">
      {banner ? <FormBanner>{banner}</FormBanner> : null}
      <Field label="E-mail" name="email-display" value={invitation.email} readOnly disabled />
      <Field label="Your name" autoComplete="name" error={formState.errors.name?.message} {...register('name')} />
      <Field label="Choose a password" type="password" autoComplete="new-password" hint={PASSWORD_HINT} error={formState.errors.password?.message} {...register('password')} />
      <button type="submit" className="pw-button w-full" disabled={formState.isSubmitting}>
        {formState.isSubmitting ? 'Joining…' : `Create account and join ${invitation.workspaceName}`}
      </button>
    </form>
  );
}

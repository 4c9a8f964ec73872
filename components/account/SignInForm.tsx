'use client';

import Link from 'next/link';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { signIn } from 'next-auth/react';
import { signInSchema, type SignInInput } from '@/lib/accounts/schemas';
import { safeReturnPath } from '@/lib/accounts/return-path';
import { Field, FormBanner } from './form-kit';

/** next-auth's error strings, in our words. */
function explain(error: string, email: string): React.ReactNode {
  if (error === 'unverified') {
    return (
      <>
        Verify your e-mail first: open the link we sent to {email}.{' '}
        <Link className="font-bold underline" href={`/verify?email=${encodeURIComponent(email)}`}>
          Send a new link
        </Link>
      </>
    );
  }
  if (error === 'rate_limited') return 'Too many failed attempts. Wait 15 minutes, or choose a new password with “Forgot your password?”.';
  if (error === 'CredentialsSignin') return 'That e-mail and password do not match an account.';
  return 'Signing in did not work. Please try again.';
}

export function SignInForm({ callbackUrl, initialError, defaultEmail }: { callbackUrl?: string; initialError?: string; defaultEmail?: string }) {
  const [banner, setBanner] = useState<React.ReactNode>(initialError ? explain(initialError, 'your address') : null);
  const { register, handleSubmit, formState } = useForm<SignInInput>({ resolver: zodResolver(signInSchema), mode: 'onTouched', defaultValues: { email: defaultEmail ?? '', password: '' } });
  const { errors, isSubmitting } = formState;
  const target = safeReturnPath(callbackUrl);

  const onSubmit = handleSubmit(async (values) => {
    setBanner(null);
    const result = await signIn('credentials', { email: values.email, password: values.password, redirect: false, callbackUrl: target });
    if (result?.ok && !result.error) {
      window.location.assign(target);
      return;
    }
    setBanner(explain(result?.error ?? 'unknown', values.email));
  });

  return (
    <form onSubmit={onSubmit} noValidate className="space-y-4" aria-label="Sign in">
      {banner ? <FormBanner>{banner}</FormBanner> : null}
      <Field label="E-mail" type="email" autoComplete="email" error={errors.email?.message} {...register('email')} />
      <Field label="Password" type="password" autoComplete="current-password" error={errors.password?.message} {...register('password')} />
      <div className="flex items-center justify-between gap-4">
        <button type="submit" className="pw-button" disabled={isSubmitting}>
          {isSubmitting ? 'Signing in…' : 'Sign in'}
        </button>
        <Link href="/forgot-password" className="text-sm font-bold text-moss-700 hover:underline">
          Forgot your password?
        </Link>
      </div>
    </form>
  );
}

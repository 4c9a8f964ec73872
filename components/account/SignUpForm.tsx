'use client';

import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { PASSWORD_MIN, signUpSchema, type SignUpInput } from '@/lib/accounts/schemas';
import { Field, FormBanner, applyServerIssues, postJson } from './form-kit';

const FIELDS = ['name', 'email', 'password', 'workspaceName'] as const;

export function SignUpForm() {
  const [banner, setBanner] = useState<string | null>(null);
  const { register, handleSubmit, setError, formState } = useForm<SignUpInput>({ resolver: zodResolver(signUpSchema), mode: 'onTouched' });
  const { errors, isSubmitting } = formState;

  const onSubmit = handleSubmit(async (values) => {
    setBanner(null);
    const result = await postJson<{ user: { email: string } }>('/api/account/signup', values);
    if (result.ok) {
      window.location.assign(`/verify?sent=1&email=${encodeURIComponent(result.data.user.email)}`);
      return;
    }
    const rest = applyServerIssues(setError, result.issues, FIELDS);
    if (rest.length || !result.issues.length) setBanner(rest.join(' ') || result.message);
  });

  return (
    <form onSubmit={onSubmit} noValidate className="space-y-4" aria-label="Create your account">
      {banner ? <FormBanner>{banner}</FormBanner> : null}
      <Field label="Your name" autoComplete="name" error={errors.name?.message} {...register('name')} />
      <Field label="E-mail" type="email" autoComplete="email" error={errors.email?.message} {...register('email')} />
      <Field label="Password" type="password" autoComplete="new-password" hint={`At least ${PASSWORD_MIN} characters.`} error={errors.password?.message} {...register('password')} />
      <Field label="Workspace name" placeholder="e.g. Riverside Cycling Club" hint="Your team's space for datasets, fits and calculators." error={errors.workspaceName?.message} {...register('workspaceName')} />
      <button type="submit" className="pw-button w-full" disabled={isSubmitting}>
        {isSubmitting ? 'Creating your account…' : 'Create account'}
      </button>
    </form>
  );
}

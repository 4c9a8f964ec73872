'use client';

import Link from 'next/link';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { z } from 'zod';
import { PASSWORD_HINT, password } from '@/lib/accounts/schemas';
import { Field, FormBanner, applyServerIssues, postJson } from './form-kit';

const schema = z.object({ password, confirm: z.string() }).refine((v) => v.password === v.confirm, { path: ['confirm'], message: 'The two passwords differ.' });
type Values = z.infer<typeof schema>;

export function ResetPasswordForm({ token }: { token: string }) {
  const [done, setDone] = useState<string | null>(null);
  const [banner, setBanner] = useState<string | null>(null);
  const { register, handleSubmit, setError, formState } = useForm<Values>({ resolver: zodResolver(schema), mode: 'onTouched' });
  const onSubmit = handleSubmit(async (values) => {
    setBanner(null);
    const result = await postJson<{ email: string }>('/api/account/password/reset', { token, password: values.password });
    if (result.ok) return setDone(result.data.email);
    const rest = applyServerIssues(setError, result.issues, ['password']);
    if (rest.length || !result.issues.length) setBanner(rest.join(' ') || result.message);
  });
  if (done) {
    return (
      <div className="space-y-4">
        <FormBanner tone="success">Your new password is set for {done}.</FormBanner>
        <Link href="/signin" className="pw-button">
          Sign in
        </Link>
      </div>
    );
  }
  return (
    <form onSubmit={onSubmit} noValidate className="space-y-4">
      {banner ? (
        <FormBanner>
          {banner}{' '}
          <Link href="/forgot-password" className="font-bold underline">
            Ask for a new link
          </Link>
        </FormBanner>
      ) : null}
      <Field label="New password" type="password" autoComplete="new-password" hint={PASSWORD_HINT} error={formState.errors.password?.message} {...register('password')} />
      <Field label="New password, again" type="password" autoComplete="new-password" error={formState.errors.confirm?.message} {...register('confirm')} />
      <button type="submit" className="pw-button" disabled={formState.isSubmitting}>
        {formState.isSubmitting ? 'Saving…' : 'Set new password'}
      </button>
    </form>
  );
}

'use client';

import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { z } from 'zod';
import { emailOnlySchema } from '@/lib/accounts/schemas';
import { Field, FormBanner, applyServerIssues, postJson } from './form-kit';

type Values = z.infer<typeof emailOnlySchema>;

/** One e-mail field posting to a route that mails a link (reset, resend confirmation). */
export function EmailRequestForm({ endpoint, submitLabel, defaultEmail }: { endpoint: string; submitLabel: string; defaultEmail?: string }) {
  const [banner, setBanner] = useState<{ tone: 'error' | 'success'; text: string } | null>(null);
  const { register, handleSubmit, setError, formState } = useForm<Values>({ resolver: zodResolver(emailOnlySchema), defaultValues: { email: defaultEmail ?? '' } });
  const onSubmit = handleSubmit(async (values) => {
    setBanner(null);
    const result = await postJson<{ message: string }>(endpoint, values);
    if (result.ok) return setBanner({ tone: 'success', text: result.data.message });
    const rest = applyServerIssues(setError, result.issues, ['email']);
    if (rest.length || !result.issues.length) setBanner({ tone: 'error', text: rest.join(' ') || result.message });
  });
  return (
    <form onSubmit={onSubmit} noValidate className="space-y-4">
      {banner ? <FormBanner tone={banner.tone}>{banner.text}</FormBanner> : null}
      <Field label="E-mail" type="email" autoComplete="email" error={formState.errors.email?.message} {...register('email')} />
      <button type="submit" className="pw-button" disabled={formState.isSubmitting}>
        {formState.isSubmitting ? 'Sending…' : submitLabel}
      </button>
    </form>
  );
}

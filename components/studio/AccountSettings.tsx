'use client';

import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { changePasswordSchema, deleteAccountSchema, updateProfileSchema, type ChangePasswordInput, type DeleteAccountInput, type UpdateProfileInput } from '@/lib/accounts/account-schemas';
import { Field, FormBanner, postJson } from '@/components/account/form-kit';
import { fixFieldsNotice, placeServerIssues } from './form-issues';

/** Name the team sees; only the account's own session can change it. */
export function NameForm({ name }: { name: string }) {
  const router = useRouter();
  const [banner, setBanner] = useState<{ tone: 'error' | 'success'; text: string } | null>(null);
  const { register, handleSubmit, setError, formState } = useForm<UpdateProfileInput>({ resolver: zodResolver(updateProfileSchema), defaultValues: { name } });
  const submit = handleSubmit(async (values) => {
    setBanner(null);
    const result = await postJson<{ user: { name: string } }>('/api/account', values, 'PATCH');
    if (result.ok) {
      setBanner({ tone: 'success', text: 'Saved. Your team sees the new name.' });
      return router.refresh();
    }
    const rest = placeServerIssues(setError, result.issues, (field) => (field === 'name' ? { name: 'name' } : null));
    if (rest.length || !result.issues.length) setBanner({ tone: 'error', text: rest.join(' ') || result.message });
  });
  return (
    <form onSubmit={submit} noValidate className="max-w-md space-y-4">
      <Field label="Your name" autoComplete="name" maxLength={120} error={formState.errors.name?.message} hint="Shown to the people in your workspaces and in mails we send you." {...register('name')} />
      <div className="flex items-center gap-4">
        <button type="submit" className="pw-button" disabled={formState.isSubmitting}>
          {formState.isSubmitting ? 'Saving…' : 'Save name'}
        </button>
      </div>
      {banner ? <FormBanner tone={banner.tone}>{banner.text}</FormBanner> : null}
    </form>
  );
}

type PasswordValues = ChangePasswordInput & { repeatPassword: string };

/** New password, given the current one; typed twice so a slip does not lock the person out. */
export function PasswordForm({ email }: { email: string }) {
  const [banner, setBanner] = useState<{ tone: 'error' | 'success'; text: string } | null>(null);
  const { register, handleSubmit, setError, reset, formState } = useForm<PasswordValues>({ defaultValues: { currentPassword: '', newPassword: '', repeatPassword: '' } });
  const errors = formState.errors;
  // The repeat is checked here only: the server needs the new password once.
  const submit = handleSubmit(async ({ repeatPassword, ...values }) => {
    setBanner(null);
    const checked = changePasswordSchema.safeParse(values);
    if (!checked.success) {
      for (const issue of checked.error.issues) setError(String(issue.path[0]) as keyof PasswordValues, { type: 'client', message: issue.message });
      return;
    }
    if (repeatPassword !== values.newPassword) return setError('repeatPassword', { type: 'client', message: 'This is not the same as the new password above; type it again.' });
    const result = await postJson<{ message: string }>('/api/account/password', values, 'PUT');
    if (result.ok) {
      reset();
      setBanner({ tone: 'success', text: result.data.message });
      // The session ended with the old password: straight on to sign-in, back to this page after.
      window.setTimeout(() => window.location.assign(`/signin?email=${encodeURIComponent(email)}&callbackUrl=${encodeURIComponent('/studio/account')}`), 1500);
      return;
    }
    const rest = placeServerIssues(setError, result.issues, (field) => (field === 'currentPassword' || field === 'newPassword' ? { name: field } : null));
    setBanner({ tone: 'error', text: rest.length ? rest.join(' ') : result.issues.length ? fixFieldsNotice(result.issues.length) : result.message });
  });
  return (
    <form onSubmit={submit} noValidate className="max-w-md space-y-4">
      {/* Lets password managers file the new password under the right account. */}
      <input type="email" name="username" autoComplete="username" value={email} readOnly hidden />
      <Field label="Current password" type="password" autoComplete="current-password" error={errors.currentPassword?.message} {...register('currentPassword')} />
      <Field label="New password" type="password" autoComplete="new-password" error={errors.newPassword?.message} hint="At least 10 characters. A few unrelated words make a strong one." {...register('newPassword')} />
      <Field label="New password again" type="password" autoComplete="new-password" error={errors.repeatPassword?.message} {...register('repeatPassword')} />
      <button type="submit" className="pw-button" disabled={formState.isSubmitting}>
        {formState.isSubmitting ? 'Changing…' : 'Change password'}
      </button>
      {banner ? <FormBanner tone={banner.tone}>{banner.text}</FormBanner> : null}
    </form>
  );
}

/** Deleting the account: typed e-mail and password; blocked while a shared workspace would lose its only owner. */
export function DeleteAccountForm({ email, blocked }: { email: string; blocked: boolean }) {
  const [banner, setBanner] = useState<string | null>(null);
  const { register, handleSubmit, setError, watch, formState } = useForm<DeleteAccountInput>({ resolver: zodResolver(deleteAccountSchema), defaultValues: { confirmEmail: '', password: '' } });
  const typed = watch('confirmEmail');
  const matches = typed.trim().toLowerCase() === email.toLowerCase();
  const submit = handleSubmit(async (values) => {
    setBanner(null);
    if (!matches) return setError('confirmEmail', { type: 'client', message: `Type ${email} exactly, to confirm.` });
    const result = await postJson<{ deleted: true }>('/api/account', values, 'DELETE');
    if (result.ok) {
      // The answer cleared this browser's session cookies; a full load leaves nothing of the studio behind.
      window.location.assign('/account-deleted');
      return;
    }
    const rest = placeServerIssues(setError, result.issues, (field) => (field === 'confirmEmail' || field === 'password' ? { name: field } : null));
    setBanner(rest.length ? result.message : result.issues.length ? fixFieldsNotice(result.issues.length) : result.message);
  });
  return (
    <form onSubmit={submit} noValidate className="max-w-md space-y-4">
      <fieldset disabled={blocked || formState.isSubmitting} className="min-w-0 space-y-4">
        <Field label={`Type ${email} to confirm`} autoComplete="off" spellCheck={false} error={formState.errors.confirmEmail?.message} {...register('confirmEmail')} />
        <Field label="Your password" type="password" autoComplete="current-password" error={formState.errors.password?.message} {...register('password')} />
        <button type="submit" className="inline-flex items-center justify-center rounded-full bg-clay-700 px-5 py-2.5 text-sm font-bold text-white transition hover:bg-clay-500 disabled:cursor-not-allowed disabled:opacity-50" disabled={blocked || !matches || formState.isSubmitting}>
          {formState.isSubmitting ? 'Deleting…' : 'Delete my account for good'}
        </button>
      </fieldset>
      {banner ? <FormBanner tone="error">{banner}</FormBanner> : null}
    </form>
  );
}

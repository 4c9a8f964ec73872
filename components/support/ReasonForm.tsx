'use client';

import { useRouter } from 'next/navigation';
import { useEffect, useRef, useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { z } from 'zod';
import { REASON_MAX, reasonSchema } from '@/lib/support/schemas';
import { postJson, SupportApiError } from './api';

const formSchema = z.object({ reason: reasonSchema, closeReports: z.boolean().optional() });
type FormValues = z.infer<typeof formSchema>;

/**
 * A staff action that needs a reason (switch off, switch on, suspend, restore). The
 * reason is checked here for quick feedback and again by the route.
 */
export function ReasonForm(props: {
  url: string;
  title: string;
  explain: string;
  submitLabel: string;
  tone: 'danger' | 'calm';
  placeholder: string;
  /** Offer to close this many open reports along with the action. */
  openReports?: number;
  testId?: string;
  /** Ask again before acting: what will happen, in one sentence, and the button that does it. */
  confirm?: { question: string; confirmLabel: string };
}) {
  const router = useRouter();
  const [banner, setBanner] = useState<{ kind: 'error' | 'done'; text: string } | null>(null);
  const { register, handleSubmit, formState, setError, reset, watch } = useForm<FormValues>({ resolver: zodResolver(formSchema), defaultValues: { reason: '', closeReports: true } });
  const { errors, isSubmitting } = formState;
  const length = (watch('reason') ?? '').length;
  // A checked reason waiting for the second, deliberate click (only with `confirm`).
  const [pending, setPending] = useState<FormValues | null>(null);
  const confirmRef = useRef<HTMLDivElement>(null);
  useEffect(() => {
    if (pending) confirmRef.current?.focus();
  }, [pending]);

  async function act(values: FormValues) {
    setBanner(null);
    setPending(null);
    try {
      const body = props.openReports ? values : { reason: values.reason };
      const result = await postJson<{ ownersNotified?: number }>(props.url, body);
      reset({ reason: '', closeReports: true });
      setBanner({ kind: 'done', text: `Done. ${result.ownersNotified ? `${result.ownersNotified} owner${result.ownersNotified === 1 ? ' was' : 's were'} e-mailed.` : 'No owner to e-mail.'}` });
      router.refresh();
    } catch (e) {
      if (e instanceof SupportApiError && e.issues.some((i) => i.field === 'reason')) setError('reason', { message: e.issues.find((i) => i.field === 'reason')!.message });
      else setBanner({ kind: 'error', text: (e as Error).message });
    }
  }

  const onSubmit = handleSubmit(async (values) => {
    if (props.confirm) setPending(values);
    else await act(values);
  });

  const id = `${props.testId ?? 'reason'}-field`;
  return (
    <form onSubmit={onSubmit} noValidate className="space-y-3" aria-label={props.title} data-testid={props.testId}>
      <h3 className="text-lg font-semibold">{props.title}</h3>
      <p className="text-sm text-ink-soft">{props.explain}</p>
      <div>
        <label htmlFor={id} className="pw-label">
          Reason (the owner reads this)
        </label>
        <textarea id={id} rows={3} className="pw-input" placeholder={props.placeholder} aria-invalid={!!errors.reason} aria-describedby={errors.reason ? `${id}-error` : undefined} {...register('reason')} />
        <div className="flex justify-between">
          {errors.reason ? (
            <p id={`${id}-error`} className="pw-field-error" role="alert">
              {errors.reason.message}
            </p>
          ) : (
            <span />
          )}
          <span className={`mt-1 text-xs ${length > REASON_MAX ? 'text-clay-700' : 'text-ink-faint'}`}>
            {length}/{REASON_MAX}
          </span>
        </div>
      </div>
      {props.openReports ? (
        <label className="flex items-center gap-2 text-sm">
          <input type="checkbox" className="h-4 w-4 accent-moss-600" {...register('closeReports')} />
          Also close the {props.openReports} open report{props.openReports === 1 ? '' : 's'}
        </label>
      ) : null}
      {banner ? (
        <p role="status" className={`rounded-lg px-3 py-2 text-sm ${banner.kind === 'error' ? 'bg-clay-100 text-clay-700' : 'bg-moss-50 text-moss-900'}`}>
          {banner.text}
        </p>
      ) : null}
      {pending && props.confirm ? (
        <div ref={confirmRef} tabIndex={-1} role="group" aria-label="Confirm" className="space-y-3 rounded-lg border-2 border-clay-500 bg-clay-100/60 p-4 focus:outline-none" data-testid={`${props.testId ?? 'reason'}-confirm`}>
          <p className="text-sm font-bold text-clay-700">{props.confirm.question}</p>
          <div className="flex flex-wrap gap-2">
            <button type="button" className="pw-button bg-clay-500 hover:bg-clay-700" onClick={() => act(pending)}>
              {props.confirm.confirmLabel}
            </button>
            <button type="button" className="pw-button-quiet" onClick={() => setPending(null)}>
              Not now
            </button>
          </div>
        </div>
      ) : (
        <button type="submit" disabled={isSubmitting} className={props.tone === 'danger' ? 'pw-button bg-clay-500 hover:bg-clay-700' : 'pw-button'}>
          {isSubmitting ? 'Working…' : props.submitLabel}
        </button>
      )}
    </form>
  );
}

'use client';

import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { ErrorNote } from '@/components/studio/StudioPage';
import { fixFieldsNotice, parseTypedNumber, placeServerIssues } from '@/components/studio/form-issues';
import type { InsightAlertSettings } from '@/lib/insight/types';
import { formatDateTime, formatNumber } from '@/lib/format';
import { callApi } from './api';

interface Values {
  subscribed: boolean;
  driftThreshold: string;
  unusualPercent: string;
}

/** The signed-in member's weekly mail: on or off, and the two thresholds that trigger it. */
export function InsightAlertsForm({ embedId, initial, onSaved }: { embedId: number; initial: InsightAlertSettings; onSaved: () => void }) {
  const [notice, setNotice] = useState<string | null>(null);
  const [saved, setSaved] = useState(false);
  const { register, handleSubmit, setError, formState } = useForm<Values>({
    defaultValues: { subscribed: initial.subscribed, driftThreshold: formatNumber(initial.driftThreshold, 2), unusualPercent: String(Math.round(initial.unusualShare * 1000) / 10) },
  });
  const errors = formState.errors;

  const submit = handleSubmit(async (values) => {
    setNotice(null);
    setSaved(false);
    const drift = parseTypedNumber(values.driftThreshold);
    const unusual = parseTypedNumber(values.unusualPercent);
    const result = await callApi(`/api/embeds/${embedId}/insight/alerts`, 'PUT', {
      subscribed: values.subscribed,
      driftThreshold: drift ?? -1,
      unusualShare: unusual === null ? -1 : unusual / 100,
    });
    if (!result.ok) {
      const rest = placeServerIssues(setError, result.error.issues, (field) => {
        if (field === 'driftThreshold') return { name: 'driftThreshold' };
        if (field === 'unusualShare') return { name: 'unusualPercent' };
        if (field === 'subscribed') return { name: 'subscribed' };
        return null;
      });
      return setNotice(rest.length ? rest.join(' ') : result.error.issues.length ? fixFieldsNotice(result.error.issues.length) : result.error.message);
    }
    setSaved(true);
    onSaved();
  });

  return (
    <form onSubmit={submit} noValidate className="grid gap-4" aria-label="Weekly insight mail">
      <fieldset disabled={formState.isSubmitting} className="grid gap-4">
        <label className="flex items-start gap-3">
          <input type="checkbox" className="mt-1 h-4 w-4 accent-moss-600" {...register('subscribed')} />
          <span>
            <span className="font-bold">Mail me when visitors drift</span>
            <span className="block text-sm text-ink-soft">At most once a week for this calculator, when either figure below is crossed over the last 7 days.</span>
          </span>
        </label>
        <div className="grid gap-4 sm:grid-cols-2">
          <div>
            <label htmlFor="ia-drift" className="pw-label">Overall drift at or above</label>
            <input id="ia-drift" inputMode="decimal" className="pw-input" aria-invalid={errors.driftThreshold ? true : undefined} aria-describedby="ia-drift-help" {...register('driftThreshold')} />
            {errors.driftThreshold && <p className="pw-field-error">{errors.driftThreshold.message}</p>}
            <p id="ia-drift-help" className="mt-1 text-sm text-ink-soft">A stability index between 0.05 and 1; 0.25 is where “act” starts.</p>
          </div>
          <div>
            <label htmlFor="ia-unusual" className="pw-label">Unusual answers at or above (%)</label>
            <input id="ia-unusual" inputMode="decimal" className="pw-input" aria-invalid={errors.unusualPercent ? true : undefined} {...register('unusualPercent')} />
            {errors.unusualPercent && <p className="pw-field-error">{errors.unusualPercent.message}</p>}
          </div>
        </div>
        <div className="flex flex-wrap items-center gap-3">
          <button type="submit" className="pw-button">Save mail settings</button>
          {saved && <p role="status" className="text-sm text-moss-700">Saved.</p>}
          {initial.lastSentAt && <p className="text-sm text-ink-soft">Last mail: {formatDateTime(initial.lastSentAt)}</p>}
        </div>
        {notice && <ErrorNote message={notice} />}
      </fieldset>
    </form>
  );
}

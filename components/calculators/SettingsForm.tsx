'use client';
import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { ErrorNote } from '@/components/studio/StudioPage';
import { fixFieldsNotice, parseTypedNumber, placeServerIssues } from '@/components/studio/form-issues';
import { LANGUAGE_NAMES, LANGUAGE_SETTINGS } from '@/lib/i18n/languages';
import { callApi } from './api';

interface Settings {
  title: string;
  allowedOrigins: string[];
  theme: 'light' | 'dark';
  accentColor: string;
  typicalityThreshold: number;
  language: string;
}

interface Values {
  title: string;
  origins: string;
  theme: 'light' | 'dark';
  accent: string;
  threshold: string;
  language: string;
}

const originLines = (text: string) => text.split(/\r?\n/).map((s) => s.trim()).filter(Boolean);

/** Title, host origins (one per line), theme, accent colour and the "unlike the data" threshold. */
export function SettingsForm({ embedId, initial, disabled }: { embedId: number; initial: Settings; disabled: boolean }) {
  const router = useRouter();
  const [notice, setNotice] = useState<string | null>(null);
  const [saved, setSaved] = useState<string | null>(null);
  // The nearest readable accent the server proposed when it refused the chosen one.
  const [accentSuggestion, setAccentSuggestion] = useState<string | null>(null);
  const { register, handleSubmit, setError, setValue, clearErrors, formState } = useForm<Values>({
    defaultValues: { title: initial.title, origins: initial.allowedOrigins.join('\n'), theme: initial.theme, accent: initial.accentColor, threshold: String(initial.typicalityThreshold), language: initial.language },
  });
  const errors = formState.errors;

  const submit = handleSubmit(async (values) => {
    setSaved(null);
    setNotice(null);
    setAccentSuggestion(null);
    const lines = originLines(values.origins);
    const result = await callApi<{ embed: Settings }>(`/api/embeds/${embedId}`, 'PATCH', {
      title: values.title,
      allowedOrigins: lines,
      theme: values.theme === 'dark' ? 'dark' : 'light',
      accentColor: values.accent,
      typicalityThreshold: parseTypedNumber(values.threshold) ?? -1,
      language: values.language,
    });
    if (!result.ok) {
      setAccentSuggestion(result.error.issues.find((i) => i.field === 'accentColor' && i.suggestion)?.suggestion ?? null);
      const rest = placeServerIssues(setError, result.error.issues, (field, message) => {
        const line = /^allowedOrigins\.(\d+)$/.exec(field);
        // Point origin issues at the line the person typed, in words: 'Line 2: "…" must start with https://'.
        if (line) return { name: 'origins', message: `Line ${Number(line[1]) + 1}: ${message}` };
        if (field === 'allowedOrigins') return { name: 'origins' };
        if (field === 'title') return { name: 'title' };
        if (field === 'theme') return { name: 'theme' };
        if (field === 'accentColor') return { name: 'accent' };
        if (field === 'typicalityThreshold') return { name: 'threshold' };
        if (field === 'language') return { name: 'language' };
        return null;
      });
      return setNotice(rest.length ? rest.join(' ') : result.error.issues.length ? fixFieldsNotice(result.error.issues.length) : result.error.message);
    }
    // Show the list as it was stored: page addresses cut to their site, duplicates gone.
    const stored = result.data.embed.allowedOrigins;
    setValue('origins', stored.join('\n'));
    const shortened = lines.length !== stored.length || lines.some((l, i) => l !== stored[i]);
    setSaved(shortened ? 'Saved. Website addresses were shortened to the site part, which is what browsers check.' : 'Saved. The preview shows the change.');
    router.refresh();
  });

  return (
    <form onSubmit={submit} onChange={() => notice && setNotice(null)} noValidate className="grid gap-4" aria-label="Calculator settings">
      <fieldset disabled={disabled || formState.isSubmitting} className="grid min-w-0 gap-4">
        <div>
          <label htmlFor="s-title" className="pw-label">Title</label>
          <input id="s-title" className="pw-input" maxLength={200} aria-invalid={errors.title ? true : undefined} {...register('title', { validate: (v) => v.trim().length > 0 || 'Give the calculator a title.' })} />
          {errors.title && <p className="pw-field-error">{errors.title.message}</p>}
        </div>
        <div>
          <label htmlFor="s-origins" className="pw-label">Websites that may show it</label>
          <textarea
            id="s-origins"
            rows={4}
            className="pw-input font-mono text-sm"
            aria-describedby="s-origins-help"
            aria-invalid={errors.origins ? true : undefined}
            placeholder="No websites yet: add one per line"
            {...register('origins')}
          />
          {errors.origins && <p className="pw-field-error">{errors.origins.message}</p>}
          <p id="s-origins-help" className="mt-1 text-sm text-ink-soft">
            One website per line. Paste a page address (for example <code>https://club.example/rides/join</code>) and only the site part is kept. Any site not listed is refused by the browser (CSP frame-ancestors).
          </p>
        </div>
        <div className="grid gap-4 sm:grid-cols-3">
          <div>
            <label htmlFor="s-theme" className="pw-label">Theme</label>
            <select id="s-theme" className="pw-input" {...register('theme')}>
              <option value="light">Light</option>
              <option value="dark">Dark</option>
            </select>
            {errors.theme && <p className="pw-field-error">{errors.theme.message}</p>}
          </div>
          <div>
            <label htmlFor="s-accent" className="pw-label">Accent colour</label>
            <input
              id="s-accent"
              type="color"
              className="h-11 w-full cursor-pointer rounded-lg border border-ink/50 bg-white p-1"
              aria-invalid={errors.accent ? true : undefined}
              aria-describedby={errors.accent ? 's-accent-error' : undefined}
              {...register('accent')}
            />
            {errors.accent && (
              <p id="s-accent-error" className="pw-field-error" data-testid="accent-error">
                {errors.accent.message}
              </p>
            )}
            {errors.accent && accentSuggestion && (
              <button
                type="button"
                className="pw-button-quiet mt-2"
                onClick={() => {
                  setValue('accent', accentSuggestion, { shouldDirty: true });
                  clearErrors('accent');
                  setAccentSuggestion(null);
                  setNotice(null);
                  document.getElementById('s-accent')?.focus();
                }}
              >
                <span aria-hidden="true" className="inline-block h-4 w-4 rounded-sm ring-1 ring-ink/30" style={{ backgroundColor: accentSuggestion }} />
                Use {accentSuggestion}
              </button>
            )}
          </div>
          <div>
            <label htmlFor="s-threshold" className="pw-label">&ldquo;Unlike the data&rdquo; below (percentile)</label>
            <input
              id="s-threshold"
              inputMode="decimal"
              className="pw-input"
              aria-describedby="s-threshold-help"
              aria-invalid={errors.threshold ? true : undefined}
              {...register('threshold', { validate: (v) => parseTypedNumber(v) !== null || 'Enter a percentile between 0 and 50, like 1 or 2.5.' })}
            />
            {errors.threshold ? <p className="pw-field-error">{errors.threshold.message}</p> : null}
            <p id="s-threshold-help" className="mt-1 text-sm text-ink-soft">Visitors whose values are less typical than this share of your rows see a notice. Usual: 1.</p>
          </div>
        </div>
        <div>
          <label htmlFor="s-language" className="pw-label">Calculator language</label>
          <select id="s-language" className="pw-input" aria-describedby="s-language-help" aria-invalid={errors.language ? true : undefined} {...register('language')}>
            {LANGUAGE_SETTINGS.map((l) => (
              <option key={l} value={l}>{LANGUAGE_NAMES[l]}</option>
            ))}
          </select>
          {errors.language && <p className="pw-field-error">{errors.language.message}</p>}
          <p id="s-language-help" className="mt-1 text-sm text-ink-soft">For the calculator&rsquo;s own texts and number formats. Your labels, descriptions and caution stay as you wrote them.</p>
        </div>
      </fieldset>
      {notice && <ErrorNote message={notice} />}
      <div className="flex items-center gap-3">
        <button type="submit" className="pw-button" disabled={disabled || formState.isSubmitting}>{formState.isSubmitting ? 'Saving…' : 'Save settings'}</button>
        {saved && <p role="status" className="text-sm text-moss-700">{saved}</p>}
      </div>
    </form>
  );
}

'use client';
import { useRouter } from 'next/navigation';
import { useState, type FormEvent } from 'react';
import { ErrorNote } from '@/components/studio/StudioPage';
import { callApi, type ApiFailure } from './api';

interface Settings {
  title: string;
  allowedOrigins: string[];
  theme: 'light' | 'dark';
  accentColor: string;
  typicalityThreshold: number;
}

/** Title, host origins (one per line), theme, accent colour and the "unlike the data" threshold. */
export function SettingsForm({ embedId, initial, disabled }: { embedId: number; initial: Settings; disabled: boolean }) {
  const router = useRouter();
  const [error, setError] = useState<ApiFailure | null>(null);
  const [saved, setSaved] = useState(false);
  const [busy, setBusy] = useState(false);

  async function submit(event: FormEvent<HTMLFormElement>) {
    event.preventDefault();
    const form = new FormData(event.currentTarget);
    const origins = String(form.get('origins') ?? '').split(/\r?\n/).map((s) => s.trim()).filter(Boolean);
    const threshold = Number(String(form.get('threshold') ?? '').replace(',', '.'));
    setBusy(true);
    setSaved(false);
    setError(null);
    const result = await callApi<{ embed: Settings }>(`/api/embeds/${embedId}`, 'PATCH', {
      title: String(form.get('title') ?? ''),
      allowedOrigins: origins,
      theme: form.get('theme') === 'dark' ? 'dark' : 'light',
      accentColor: String(form.get('accent') ?? ''),
      typicalityThreshold: Number.isFinite(threshold) ? threshold : -1,
    });
    setBusy(false);
    if (!result.ok) {
      // Point origin issues at the line the person typed.
      const issues = result.error.issues.map((i) => (/^allowedOrigins\.(\d+)$/.test(i.field) ? { ...i, field: `host line ${Number(i.field.split('.')[1]) + 1}` } : i));
      return setError({ ...result.error, issues });
    }
    setSaved(true);
    router.refresh();
  }

  return (
    <form onSubmit={submit} className="grid gap-4" aria-label="Calculator settings">
      <fieldset disabled={disabled || busy} className="grid gap-4">
        <div>
          <label htmlFor="s-title" className="pw-label">Title</label>
          <input id="s-title" name="title" className="pw-input" defaultValue={initial.title} maxLength={200} required />
        </div>
        <div>
          <label htmlFor="s-origins" className="pw-label">Websites that may show it</label>
          <textarea id="s-origins" name="origins" rows={4} className="pw-input font-mono text-sm" defaultValue={initial.allowedOrigins.join('\n')} aria-describedby="s-origins-help" placeholder="https://www.example.org" />
          <p id="s-origins-help" className="mt-1 text-sm text-ink-soft">One origin per line: scheme, host and port only, e.g. <code>https://club.example</code>. Any other site is refused by the browser (CSP frame-ancestors).</p>
        </div>
        <div className="grid gap-4 sm:grid-cols-3">
          <div>
            <label htmlFor="s-theme" className="pw-label">Theme</label>
            <select id="s-theme" name="theme" className="pw-input" defaultValue={initial.theme}>
              <option value="light">Light</option>
              <option value="dark">Dark</option>
            </select>
          </div>
          <div>
            <label htmlFor="s-accent" className="pw-label">Accent colour</label>
            <input id="s-accent" name="accent" type="color" className="h-11 w-full cursor-pointer rounded-lg border border-ink/15 bg-white p-1" defaultValue={initial.accentColor} />
          </div>
          <div>
            <label htmlFor="s-threshold" className="pw-label">&ldquo;Unlike the data&rdquo; below (percentile)</label>
            <input id="s-threshold" name="threshold" inputMode="decimal" className="pw-input" defaultValue={String(initial.typicalityThreshold)} aria-describedby="s-threshold-help" />
            <p id="s-threshold-help" className="mt-1 text-sm text-ink-soft">Visitors whose values are less typical than this share of your rows see a notice. Usual: 1.</p>
          </div>
        </div>
      </fieldset>
      {error && <ErrorNote message={error.message} issues={error.issues} />}
      <div className="flex items-center gap-3">
        <button type="submit" className="pw-button" disabled={disabled || busy}>{busy ? 'Saving…' : 'Save settings'}</button>
        {saved && <p role="status" className="text-sm text-moss-700">Saved. The preview shows the change.</p>}
      </div>
    </form>
  );
}

'use client';
import { useRouter } from 'next/navigation';
import { useState, type FormEvent } from 'react';
import { ErrorNote } from '@/components/studio/StudioPage';
import { callApi, type ApiFailure } from './api';

/** Publish a named model as a new calculator, then open its page. */
export function PublishForm({ models }: { models: { id: number; name: string }[] }) {
  const router = useRouter();
  const [error, setError] = useState<ApiFailure | null>(null);
  const [busy, setBusy] = useState(false);

  async function submit(event: FormEvent<HTMLFormElement>) {
    event.preventDefault();
    const form = new FormData(event.currentTarget);
    setBusy(true);
    setError(null);
    const result = await callApi<{ embed: { id: number } }>('/api/embeds', 'POST', { mixtureModelId: Number(form.get('model')), title: String(form.get('title') ?? '').trim() || undefined });
    setBusy(false);
    if (!result.ok) return setError(result.error);
    router.push(`/studio/calculators/${result.data.embed.id}`);
  }

  if (!models.length) return <p className="text-ink-soft">Name the clusters of a fit first; named models can be published here.</p>;
  return (
    <form onSubmit={submit} className="grid gap-4 sm:grid-cols-[1fr_1fr_auto] sm:items-end">
      <div>
        <label htmlFor="publish-model" className="pw-label">Model</label>
        <select id="publish-model" name="model" className="pw-input" defaultValue={models[0].id}>
          {models.map((m) => (
            <option key={m.id} value={m.id}>{m.name}</option>
          ))}
        </select>
      </div>
      <div>
        <label htmlFor="publish-title" className="pw-label">Title visitors see (optional)</label>
        <input id="publish-title" name="title" className="pw-input" maxLength={200} placeholder="The model's name" />
      </div>
      <button type="submit" className="pw-button" disabled={busy}>{busy ? 'Publishing…' : 'Publish'}</button>
      {error && <div className="sm:col-span-3"><ErrorNote message={error.message} issues={error.issues} /></div>}
    </form>
  );
}

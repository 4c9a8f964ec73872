'use client';
import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { ErrorNote } from '@/components/studio/StudioPage';
import { fixFieldsNotice, placeServerIssues } from '@/components/studio/form-issues';
import { callApi } from './api';

interface Values {
  model: string;
  title: string;
  website: string;
}

/**
 * Publish a named model as a new calculator, then open its page. The website that will
 * show it is asked for here: without one, the snippet works on no real site.
 */
export function PublishForm({ models, defaultModelId }: { models: { id: number; name: string }[]; defaultModelId?: number }) {
  const router = useRouter();
  const [notice, setNotice] = useState<string | null>(null);
  const initialModel = models.some((m) => m.id === defaultModelId) ? defaultModelId! : models[0]?.id;
  const { register, handleSubmit, setError, formState } = useForm<Values>({ defaultValues: { model: String(initialModel ?? ''), title: '', website: '' } });
  const errors = formState.errors;

  const submit = handleSubmit(async (values) => {
    setNotice(null);
    const website = values.website.trim();
    const result = await callApi<{ embed: { id: number } }>('/api/embeds', 'POST', {
      mixtureModelId: Number(values.model),
      title: values.title.trim() || undefined,
      ...(website ? { allowedOrigins: [website] } : {}),
    });
    if (result.ok) return router.push(`/studio/calculators/${result.data.embed.id}`);
    const rest = placeServerIssues(setError, result.error.issues, (field, message) => {
      if (field.startsWith('allowedOrigins')) return { name: 'website', message: `This address ${message.replace(/^"[^"]*" /, '')}` };
      if (field === 'title') return { name: 'title' };
      if (field === 'mixtureModelId') return { name: 'model', message: 'Choose one of the models in the list.' };
      return null;
    });
    setNotice(rest.length ? rest.join(' ') : result.error.issues.length ? fixFieldsNotice(result.error.issues.length) : result.error.message);
  });

  if (!models.length) return <p className="text-ink-soft">Name the clusters of a fit first; named models can be published here.</p>;
  return (
    <form onSubmit={submit} onChange={() => notice && setNotice(null)} noValidate className="grid gap-4 md:grid-cols-2" aria-label="Publish a model">
      <div>
        <label htmlFor="pub-model" className="pw-label">Model</label>
        <select id="pub-model" className="pw-input" aria-invalid={errors.model ? true : undefined} {...register('model')}>
          {models.map((m) => (
            <option key={m.id} value={m.id}>{m.name}</option>
          ))}
        </select>
        {errors.model && <p className="pw-field-error">{errors.model.message}</p>}
      </div>
      <div>
        <label htmlFor="pub-title" className="pw-label">Title visitors see (optional)</label>
        <input id="pub-title" className="pw-input" maxLength={200} aria-describedby="pub-title-help" aria-invalid={errors.title ? true : undefined} {...register('title')} />
        {errors.title ? <p className="pw-field-error">{errors.title.message}</p> : <p id="pub-title-help" className="mt-1 text-sm text-ink-soft">Left empty, visitors see the model&rsquo;s name.</p>}
      </div>
      <div className="md:col-span-2">
        <label htmlFor="pub-website" className="pw-label">Your website that will show it</label>
        <input
          id="pub-website"
          type="url"
          inputMode="url"
          autoComplete="url"
          className="pw-input font-mono text-sm"
          aria-describedby="pub-website-help"
          aria-invalid={errors.website ? true : undefined}
          {...register('website', { validate: (v) => !v.trim() || /^https?:\/\//i.test(v.trim()) || 'Start the address with https:// (or http:// for a site on your own computer).' })}
        />
        {errors.website ? (
          <p className="pw-field-error">{errors.website.message}</p>
        ) : (
          <p id="pub-website-help" className="mt-1 text-sm text-ink-soft">
            Paste the address of the page the calculator goes on, like <code>https://club.example/rides/join</code>; only the site part is kept. Browsers show the calculator on the websites you list and nowhere else. You can add more later.
          </p>
        )}
      </div>
      <div className="md:col-span-2">
        <button type="submit" className="pw-button" disabled={formState.isSubmitting}>{formState.isSubmitting ? 'Publishing…' : 'Publish'}</button>
      </div>
      {notice && <div className="md:col-span-2"><ErrorNote message={notice} /></div>}
    </form>
  );
}

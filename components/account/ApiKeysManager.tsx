'use client';

import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import type { z } from 'zod';
import { API_KEY_SCOPES, apiKeyCreateSchema, SCOPE_WORDS, type ApiKeyScope } from '@/lib/auth/api-key-schemas';
import { formatDateTime } from '@/lib/format';
import { Field, FormBanner, applyServerIssues, postJson } from './form-kit';

export interface ApiKeyRow {
  id: number;
  name: string;
  prefix: string;
  scopes: ApiKeyScope[];
  expiresAt: string | null;
  lastUsedAt: string | null;
  revokedAt: string | null;
  createdAt: string;
}

type Values = z.input<typeof apiKeyCreateSchema>;

function keyState(k: ApiKeyRow, now: number): { words: string; tone: string } {
  if (k.revokedAt) return { words: 'Revoked', tone: 'bg-clay-100 text-clay-700' };
  if (k.expiresAt && new Date(k.expiresAt).getTime() <= now) return { words: 'Expired', tone: 'bg-paper-deep text-ink-soft' };
  return { words: 'Active', tone: 'bg-moss-100 text-moss-900' };
}

/** The owners' list of keys, the form that makes one, and the new key shown once. The routes check the role. */
export function ApiKeysManager({ keys }: { keys: ApiKeyRow[] }) {
  const router = useRouter();
  const [created, setCreated] = useState<{ name: string; secret: string } | null>(null);
  const [copied, setCopied] = useState(false);
  const [message, setMessage] = useState<{ tone: 'error' | 'success'; text: string } | null>(null);
  const [busy, setBusy] = useState<number | null>(null);
  const now = Date.now();

  async function revoke(k: ApiKeyRow) {
    if (!window.confirm(`Revoke the key "${k.name}" (${k.prefix})? Anything still using it stops working at once.`)) return;
    setBusy(k.id);
    setMessage(null);
    const result = await postJson(`/api/workspaces/current/api-keys/${k.id}`, {}, 'DELETE');
    setBusy(null);
    if (result.ok) {
      setMessage({ tone: 'success', text: `The key "${k.name}" was revoked.` });
      router.refresh();
    } else setMessage({ tone: 'error', text: result.message });
  }

  async function copy() {
    if (!created) return;
    try {
      await navigator.clipboard.writeText(created.secret);
      setCopied(true);
    } catch {
      setMessage({ tone: 'error', text: 'The browser did not allow copying; select the key and copy it by hand.' });
    }
  }

  return (
    <div className="space-y-6">
      {message ? <FormBanner tone={message.tone}>{message.text}</FormBanner> : null}
      {created ? (
        <section className="pw-card border-l-4 border-saffron-500 p-6" aria-labelledby="new-key-title">
          <h2 id="new-key-title" className="text-xl font-bold">
            Your new key “{created.name}”
          </h2>
          <p className="mt-1 text-sm text-ink-soft">
            This key is <strong>shown once</strong>. Copy it now into your pipeline&apos;s secret store; Partwise keeps only a fingerprint of it and cannot show it again.
          </p>
          <div className="mt-4 flex flex-wrap items-center gap-3">
            <code data-testid="new-api-key" className="min-w-0 flex-1 break-all rounded-lg bg-paper-deep px-3 py-2 font-mono text-sm">
              {created.secret}
            </code>
            <button type="button" className="pw-button" onClick={copy}>
              {copied ? 'Copied' : 'Copy key'}
            </button>
            <button type="button" className="pw-button-quiet" onClick={() => setCreated(null)}>
              I have stored it
            </button>
          </div>
        </section>
      ) : null}

      <section className="pw-card overflow-x-auto">
        <h2 className="px-6 pt-5 text-xl font-bold">Keys of this workspace</h2>
        {keys.length === 0 ? (
          <p className="px-6 pb-5 pt-2 text-sm text-ink-soft">No keys yet. Make one below.</p>
        ) : (
          <table className="mt-3 w-full min-w-[720px] text-left text-sm">
            <thead className="border-b border-ink/10 text-ink-faint">
              <tr>
                <th className="px-6 py-2 font-bold">Name</th>
                <th className="px-3 py-2 font-bold">Key starts</th>
                <th className="px-3 py-2 font-bold">Scopes</th>
                <th className="px-3 py-2 font-bold">Made</th>
                <th className="px-3 py-2 font-bold">Expires</th>
                <th className="px-3 py-2 font-bold">Last used</th>
                <th className="px-6 py-2 text-right font-bold">State</th>
              </tr>
            </thead>
            <tbody>
              {keys.map((k) => {
                const state = keyState(k, now);
                return (
                  <tr key={k.id} className="border-b border-ink/5 last:border-0">
                    <td className="px-6 py-3 font-bold">{k.name}</td>
                    <td className="px-3 py-3 font-mono text-xs">{k.prefix}_…</td>
                    <td className="px-3 py-3">{k.scopes.join(', ')}</td>
                    <td className="px-3 py-3 text-ink-soft">{formatDateTime(k.createdAt)}</td>
                    <td className="px-3 py-3 text-ink-soft">{k.expiresAt ? formatDateTime(k.expiresAt) : 'never'}</td>
                    <td className="px-3 py-3 text-ink-soft">{k.lastUsedAt ? formatDateTime(k.lastUsedAt) : 'not yet'}</td>
                    <td className="px-6 py-3 text-right">
                      <span className={`whitespace-nowrap rounded-full px-2 py-0.5 text-xs font-bold ${state.tone}`}>{state.words}</span>
                      {k.revokedAt ? <div className="mt-1 text-xs text-ink-faint">{formatDateTime(k.revokedAt)}</div> : null}
                      {!k.revokedAt ? (
                        <button type="button" className="ml-3 text-sm font-bold text-clay-700 hover:underline disabled:opacity-50" disabled={busy !== null} onClick={() => revoke(k)}>
                          Revoke<span className="sr-only"> {k.name}</span>
                        </button>
                      ) : null}
                    </td>
                  </tr>
                );
              })}
            </tbody>
          </table>
        )}
      </section>

      <NewKeyForm
        onCreated={(name, secret) => {
          setCreated({ name, secret });
          setCopied(false);
          setMessage(null);
          router.refresh();
        }}
      />
    </div>
  );
}

function NewKeyForm({ onCreated }: { onCreated: (name: string, secret: string) => void }) {
  const [banner, setBanner] = useState<string | null>(null);
  const { register, handleSubmit, setError, reset, formState } = useForm<Values>({
    resolver: zodResolver(apiKeyCreateSchema),
    defaultValues: { name: '', scopes: ['read'], expiresInDays: 365 },
  });
  const onSubmit = handleSubmit(async (values) => {
    setBanner(null);
    const result = await postJson<{ key: { name: string }; secret: string }>('/api/workspaces/current/api-keys', values);
    if (result.ok) {
      reset({ name: '', scopes: ['read'], expiresInDays: 365 });
      onCreated(result.data.key.name, result.data.secret);
      return;
    }
    const rest = applyServerIssues(setError, result.issues, ['name', 'scopes', 'expiresInDays']);
    if (rest.length || !result.issues.length) setBanner(rest.join(' ') || result.message);
  });
  const errors = formState.errors;
  return (
    <form onSubmit={onSubmit} noValidate className="pw-card space-y-5 p-6" aria-label="Make an API key">
      <h2 className="text-xl font-bold">Make a key</h2>
      {banner ? <FormBanner>{banner}</FormBanner> : null}
      <Field label="Name" hint="Say where it is used, like “Nightly re-fit”." error={errors.name?.message} {...register('name')} />
      <fieldset aria-describedby={errors.scopes ? 'scopes-error' : undefined}>
        <legend className="pw-label">Scopes</legend>
        <div className="grid gap-2 sm:grid-cols-2">
          {API_KEY_SCOPES.map((scope) => (
            <label key={scope} className="flex items-start gap-2 rounded-lg px-3 py-2 text-sm ring-1 ring-ink/10">
              <input type="checkbox" value={scope} className="mt-1" {...register('scopes')} />
              <span>
                <strong>{scope}</strong> <span className="text-ink-soft">— {SCOPE_WORDS[scope]}</span>
              </span>
            </label>
          ))}
        </div>
        {errors.scopes ? (
          <p id="scopes-error" className="pw-field-error">
            {errors.scopes.message ?? errors.scopes.root?.message ?? 'Choose the scopes again.'}
          </p>
        ) : null}
      </fieldset>
      <Field
        label="Expires after (days)"
        type="number"
        inputMode="numeric"
        min={1}
        max={730}
        hint="1 to 730 days; leave empty for a key that does not expire."
        error={errors.expiresInDays?.message}
        {...register('expiresInDays', { setValueAs: (v: unknown) => (v === '' || v === null || v === undefined ? undefined : Number(v)) })}
      />
      <button type="submit" className="pw-button" disabled={formState.isSubmitting}>
        {formState.isSubmitting ? 'Making the key…' : 'Make key'}
      </button>
    </form>
  );
}

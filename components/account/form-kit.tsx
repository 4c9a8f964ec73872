'use client';

import type { FieldValues, Path, UseFormSetError } from 'react-hook-form';
import type { InputHTMLAttributes, ReactNode, Ref } from 'react';

/** What every account form gets back from a JSON route. */
export type PostResult<T> =
  | { ok: true; status: number; data: T }
  | { ok: false; status: number; message: string; issues: { field: string; message: string }[] };

export async function postJson<T = unknown>(url: string, body: unknown, method = 'POST'): Promise<PostResult<T>> {
  try {
    const res = await fetch(url, { method, headers: { 'content-type': 'application/json' }, body: JSON.stringify(body) });
    const text = await res.text();
    const json = text ? JSON.parse(text) : {};
    if (res.ok) return { ok: true, status: res.status, data: json as T };
    return { ok: false, status: res.status, message: json?.error?.message ?? `The request failed (${res.status}).`, issues: json?.error?.issues ?? [] };
  } catch {
    return { ok: false, status: 0, message: 'Partwise could not be reached. Check your connection and try again.', issues: [] };
  }
}

/**
 * Put the server's zod issues on the matching fields; issues for fields the form
 * does not have come back so the form can show them in its banner.
 */
export function applyServerIssues<T extends FieldValues>(setError: UseFormSetError<T>, issues: { field: string; message: string }[], fields: readonly string[]): string[] {
  const rest: string[] = [];
  for (const issue of issues) {
    if (fields.includes(issue.field)) setError(issue.field as Path<T>, { type: 'server', message: issue.message });
    else rest.push(issue.message);
  }
  return rest;
}

export function FormBanner({ tone = 'error', children }: { tone?: 'error' | 'info' | 'success'; children: ReactNode }) {
  const styles = { error: 'bg-clay-100 text-clay-700 ring-clay-500/30', info: 'bg-saffron-100 text-ink ring-saffron-500/30', success: 'bg-moss-50 text-moss-900 ring-moss-300' }[tone];
  return (
    <div role={tone === 'error' ? 'alert' : 'status'} className={`rounded-lg px-4 py-3 text-sm ring-1 ${styles}`}>
      {children}
    </div>
  );
}

type FieldProps = InputHTMLAttributes<HTMLInputElement> & { label: string; error?: string; hint?: ReactNode; name: string; ref?: Ref<HTMLInputElement> };

/** A labelled input with its error beneath, wired for screen readers. */
export function Field({ label, error, hint, name, id, ref, ...input }: FieldProps) {
  const fieldId = id ?? `field-${name}`;
  return (
    <div>
      <label htmlFor={fieldId} className="pw-label">
        {label}
      </label>
      <input ref={ref} id={fieldId} name={name} className="pw-input" aria-invalid={error ? true : undefined} aria-describedby={error ? `${fieldId}-error` : hint ? `${fieldId}-hint` : undefined} {...input} />
      {hint && !error ? (
        <p id={`${fieldId}-hint`} className="mt-1 text-sm text-ink-faint">
          {hint}
        </p>
      ) : null}
      {error ? (
        <p id={`${fieldId}-error`} className="pw-field-error">
          {error}
        </p>
      ) : null}
    </div>
  );
}

'use client';

import { useRouter } from 'next/navigation';
import { useRef, useState } from 'react';
import { formatBytes } from '@/lib/format';
import { ApiError } from './client-api';
import { ErrorNote } from './StudioPage';

/** Drop a CSV, pick one, or paste a table; the server validates and reports what is wrong. */
export function UploadPanel({ maxBytesLabel, maxRowsLabel }: { maxBytesLabel: string; maxRowsLabel: string }) {
  const router = useRouter();
  const input = useRef<HTMLInputElement>(null);
  const [mode, setMode] = useState<'file' | 'paste'>('file');
  const [file, setFile] = useState<File | null>(null);
  const [text, setText] = useState('');
  const [name, setName] = useState('');
  const [dragging, setDragging] = useState(false);
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<ApiError | null>(null);

  async function submit(e: React.FormEvent) {
    e.preventDefault();
    setError(null);
    const form = new FormData();
    if (mode === 'file') {
      if (!file) return setError(new ApiError('Choose a CSV file first.', 422));
      form.set('file', file, file.name);
    } else {
      if (!text.trim()) return setError(new ApiError('Paste a table first: a header row, then one row per record.', 422));
      form.set('text', text);
    }
    if (name.trim()) form.set('name', name.trim());
    setBusy(true);
    try {
      const res = await fetch('/api/datasets', { method: 'POST', body: form });
      const body = await res.json().catch(() => null);
      if (!res.ok) throw new ApiError(body?.error?.message ?? `Upload failed (${res.status}).`, res.status, body?.error?.issues);
      router.push(`/studio/datasets/${body.dataset.id}`);
    } catch (err) {
      setError(err instanceof ApiError ? err : new ApiError('The upload did not reach the server. Check your connection and try again.', 0));
      setBusy(false);
    }
  }

  return (
    <form onSubmit={submit} className="space-y-4" aria-label="Upload a dataset">
      <div role="tablist" className="inline-flex rounded-full bg-paper-deep p-1 text-sm font-bold">
        {(['file', 'paste'] as const).map((m) => (
          <button key={m} type="button" role="tab" aria-selected={mode === m} onClick={() => setMode(m)} className={`rounded-full px-4 py-1.5 ${mode === m ? 'bg-white text-ink shadow-card' : 'text-ink-soft'}`}>
            {m === 'file' ? 'CSV file' : 'Paste a table'}
          </button>
        ))}
      </div>
      {mode === 'file' ? (
        <div
          onDragOver={(e) => {
            e.preventDefault();
            setDragging(true);
          }}
          onDragLeave={() => setDragging(false)}
          onDrop={(e) => {
            e.preventDefault();
            setDragging(false);
            const f = e.dataTransfer.files[0];
            if (f) setFile(f);
          }}
          className={`flex flex-col items-center justify-center rounded-card border-2 border-dashed px-6 py-10 text-center transition ${dragging ? 'border-moss-500 bg-moss-50' : 'border-ink/15 bg-paper'}`}
        >
          <p className="font-display text-lg font-semibold">{file ? file.name : 'Drop a CSV file here'}</p>
          <p className="mt-1 text-sm text-ink-soft">{file ? `${formatBytes(file.size)}, ready to upload` : 'Comma, semicolon or tab separated, first row = column names.'}</p>
          <button type="button" className="pw-button-quiet mt-4" onClick={() => input.current?.click()}>
            {file ? 'Choose another file' : 'Choose a file'}
          </button>
          <input ref={input} type="file" accept=".csv,.tsv,.txt,text/csv" className="sr-only" aria-label="CSV file" data-testid="csv-file" onChange={(e) => setFile(e.target.files?.[0] ?? null)} />
        </div>
      ) : (
        <div>
          <label className="pw-label" htmlFor="paste">
            Table
          </label>
          <textarea id="paste" className="pw-input h-48 font-mono text-sm" placeholder={'avg_speed_kmh,weekly_distance_km\n24.5,130\n19.8,52'} value={text} onChange={(e) => setText(e.target.value)} />
        </div>
      )}
      <div className="grid gap-4 sm:grid-cols-[1fr_auto] sm:items-end">
        <div>
          <label className="pw-label" htmlFor="dataset-name">
            Name <span className="font-normal text-ink-faint">(optional, defaults to the file name)</span>
          </label>
          <input id="dataset-name" className="pw-input" value={name} onChange={(e) => setName(e.target.value)} maxLength={200} />
        </div>
        <button type="submit" className="pw-button" disabled={busy}>
          {busy ? 'Checking the table…' : 'Upload and check'}
        </button>
      </div>
      <p className="text-xs text-ink-faint">
        Your plan accepts files up to {maxBytesLabel} and {maxRowsLabel} complete rows. Rows with a gap in a chosen feature are left out of a fit, and the count is shown.
      </p>
      {error && <ErrorNote message={error.message} issues={error.issues} />}
    </form>
  );
}

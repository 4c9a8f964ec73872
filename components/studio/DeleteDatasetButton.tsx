'use client';

import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { api, ApiError } from './client-api';

/** Deleting asks first, and says what goes with the table. */
export function DeleteDatasetButton({ datasetId, name, fits }: { datasetId: number; name: string; fits: number }) {
  const router = useRouter();
  const [asking, setAsking] = useState(false);
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<string | null>(null);
  if (!asking) {
    return (
      <button type="button" className="rounded-full px-4 py-2 text-sm font-bold text-clay-700 ring-1 ring-clay-500/40 hover:bg-clay-100" onClick={() => setAsking(true)}>
        Delete dataset…
      </button>
    );
  }
  return (
    <div role="alertdialog" aria-labelledby="delete-title" className="max-w-md rounded-card bg-clay-100 p-4 text-sm text-clay-700 ring-1 ring-clay-500/30">
      <p id="delete-title" className="font-bold">Delete “{name}”?</p>
      <p className="mt-1">
        The uploaded file and its table are removed{fits ? `, with ${fits} fit${fits === 1 ? '' : 's'} and their results` : ''}. Named models keep their own copy and stay. This cannot be undone.
      </p>
      <div className="mt-3 flex gap-2">
        <button
          type="button"
          disabled={busy}
          className="rounded-full bg-clay-700 px-4 py-2 font-bold text-white hover:bg-clay-500 disabled:opacity-50"
          onClick={async () => {
            setBusy(true);
            try {
              await api(`/api/datasets/${datasetId}`, { method: 'DELETE' });
              router.push('/studio/datasets');
              router.refresh();
            } catch (e) {
              setError(e instanceof ApiError ? e.message : 'Could not delete.');
              setBusy(false);
            }
          }}
        >
          {busy ? 'Deleting…' : 'Yes, delete it'}
        </button>
        <button type="button" className="rounded-full px-4 py-2 font-bold text-ink-soft hover:bg-white" onClick={() => setAsking(false)}>
          Keep it
        </button>
      </div>
      {error && <p className="mt-2 font-bold">{error}</p>}
    </div>
  );
}

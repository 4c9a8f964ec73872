'use client';

import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { postJson } from './api';

/** Staff reviewed a spike and found it harmless (a newsletter, a race weekend…). */
export function ClearFlagButton({ embedId }: { embedId: number }) {
  const router = useRouter();
  const [note, setNote] = useState('');
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  async function clear() {
    setBusy(true);
    setError(null);
    try {
      await postJson(`/api/support/calculators/${embedId}/clear-flag`, note.trim() ? { note: note.trim() } : {});
      router.refresh();
    } catch (e) {
      setError((e as Error).message);
    } finally {
      setBusy(false);
    }
  }
  return (
    <div className="mt-3 flex flex-wrap items-end gap-2">
      <label className="min-w-[16rem] flex-1">
        <span className="pw-label">Review note (optional)</span>
        <input className="pw-input" value={note} maxLength={1000} onChange={(e) => setNote(e.target.value)} placeholder="e.g. club newsletter went out this morning" />
      </label>
      <button type="button" className="pw-button-quiet bg-white" onClick={clear} disabled={busy}>
        Looks fine, clear the flag
      </button>
      {error ? <p className="w-full text-sm text-clay-700">{error}</p> : null}
    </div>
  );
}

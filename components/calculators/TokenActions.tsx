'use client';
import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { ErrorNote } from '@/components/studio/StudioPage';
import { callApi, type ApiFailure } from './api';

/** Rotate the token or retire the calculator, each after an explicit confirmation. */
export function TokenActions({ embedId, retired }: { embedId: number; retired: boolean }) {
  const router = useRouter();
  const [confirming, setConfirming] = useState<'rotate' | 'retire' | null>(null);
  const [error, setError] = useState<ApiFailure | null>(null);
  const [busy, setBusy] = useState(false);

  async function run(action: 'rotate' | 'retire') {
    setBusy(true);
    setError(null);
    const result = await callApi(`/api/embeds/${embedId}/${action}`, 'POST');
    setBusy(false);
    setConfirming(null);
    if (!result.ok) return setError(result.error);
    router.refresh();
  }

  if (retired) return <p className="text-ink-soft">This calculator is retired: its address answers &ldquo;not available&rdquo; and it no longer counts towards your plan.</p>;
  return (
    <div className="space-y-4">
      <div className="grid gap-4 md:grid-cols-2">
        <div className="rounded-lg border border-ink/10 p-4">
          <h3 className="font-sans text-base font-bold">New address</h3>
          <p className="mt-1 text-sm text-ink-soft">Gives the calculator a new token. The old address stops answering at once; update the snippet on every site.</p>
          {confirming === 'rotate' ? (
            <div className="mt-3 flex flex-wrap gap-2">
              <button type="button" className="pw-button bg-clay-500 hover:bg-clay-700" disabled={busy} onClick={() => run('rotate')}>Yes, change the address</button>
              <button type="button" className="pw-button-quiet" onClick={() => setConfirming(null)}>Keep it</button>
            </div>
          ) : (
            <button type="button" className="pw-button-quiet mt-3" onClick={() => setConfirming('rotate')}>Change the address…</button>
          )}
        </div>
        <div className="rounded-lg border border-clay-500/30 p-4">
          <h3 className="font-sans text-base font-bold">Retire</h3>
          <p className="mt-1 text-sm text-ink-soft">Takes the calculator offline for good. Visitors see a neutral &ldquo;not available&rdquo; page.</p>
          {confirming === 'retire' ? (
            <div className="mt-3 flex flex-wrap gap-2">
              <button type="button" className="pw-button bg-clay-500 hover:bg-clay-700" disabled={busy} onClick={() => run('retire')}>Yes, retire it</button>
              <button type="button" className="pw-button-quiet" onClick={() => setConfirming(null)}>Keep it</button>
            </div>
          ) : (
            <button type="button" className="pw-button-quiet mt-3 text-clay-700 ring-clay-500/40" onClick={() => setConfirming('retire')}>Retire…</button>
          )}
        </div>
      </div>
      {error && <ErrorNote message={error.message} issues={error.issues} />}
    </div>
  );
}

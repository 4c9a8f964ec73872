'use client';
import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { ErrorNote } from '@/components/studio/StudioPage';
import { callApi, type ApiFailure } from './api';

/** "Serve vN" with a confirm step; serving goes through PUT /api/embeds/:id/active-version like the version list. */
export function VersionComparisonServe({ embedId, versionId, number, servedNumber, disabled }: { embedId: number; versionId: number; number: number; servedNumber: number | null; disabled: boolean }) {
  const router = useRouter();
  const [confirming, setConfirming] = useState(false);
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<ApiFailure | null>(null);

  async function serve() {
    setBusy(true);
    setError(null);
    const result = await callApi(`/api/embeds/${embedId}/active-version`, 'PUT', { versionId });
    setBusy(false);
    if (!result.ok) return setError(result.error);
    router.push(`/studio/calculators/${embedId}#versions`);
    router.refresh();
  }

  return (
    <div className="space-y-3" data-testid="compare-serve">
      {!confirming ? (
        <button type="button" className="pw-button" disabled={disabled} onClick={() => setConfirming(true)}>
          Serve v{number}
        </button>
      ) : (
        <div role="group" aria-label={`Confirm serving v${number}`} className="rounded-lg border border-moss-300 bg-moss-50 px-4 py-3">
          <p className="font-bold text-ink">Serve v{number} to visitors now?</p>
          <p className="mt-1 text-sm text-ink-soft">
            Every answer from now on comes from v{number}, on every website that shows this calculator.
            {servedNumber !== null && ` You can serve v${servedNumber} again at any time from the calculator's versions.`}
          </p>
          <div className="mt-3 flex flex-wrap gap-3">
            <button type="button" className="pw-button" disabled={busy} onClick={serve}>
              Yes, serve v{number}
            </button>
            <button type="button" className="pw-button-quiet" disabled={busy} onClick={() => setConfirming(false)}>
              Not now
            </button>
          </div>
        </div>
      )}
      {error && <ErrorNote message={error.message} issues={error.issues} />}
    </div>
  );
}

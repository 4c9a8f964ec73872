'use client';
import Link from 'next/link';
import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { ErrorNote } from '@/components/studio/StudioPage';
import { servedVersionWords } from '@/lib/embeds/status-words';
import { formatDateTime } from '@/lib/format';
import { callApi, type ApiFailure } from './api';

interface Version {
  id: number;
  number: number;
  modelName: string;
  checksum: string;
  createdAt: string;
  /** What is wrong with the stored version, when it is damaged. */
  problem: string | null;
}

/** Published versions, newest first: which one is served, switch to another, publish again. */
export function VersionList({ embedId, versions, activeVersionId, models, currentModelId, disabled, calculatorStatus }: { embedId: number; versions: Version[]; activeVersionId: number | null; models: { id: number; name: string }[]; currentModelId: number | null; disabled: boolean; calculatorStatus: string }) {
  const router = useRouter();
  const [error, setError] = useState<ApiFailure | null>(null);
  const [busy, setBusy] = useState(false);
  const [modelId, setModelId] = useState<number>(currentModelId ?? models[0]?.id ?? 0);
  /** The version whose Serve button was pressed, waiting for "Compare first" or "Serve now". */
  const [confirming, setConfirming] = useState<number | null>(null);
  const served = versions.find((v) => v.id === activeVersionId) ?? null;
  // Comparing needs a sound served version; with none (or a damaged one) serving is the repair, so it goes straight through.
  const comparable = served !== null && !served.problem;
  const compareHref = (v: Version) => `/studio/calculators/${embedId}/compare?from=${served?.id}&to=${v.id}`;

  async function run(url: string, method: string, body: unknown) {
    setBusy(true);
    setError(null);
    const result = await callApi(url, method, body);
    setBusy(false);
    if (!result.ok) return setError(result.error);
    router.refresh();
  }

  return (
    <div className="space-y-4">
      <div className="overflow-x-auto">
      <table className="w-full text-left text-sm">
        <caption className="sr-only">Published versions</caption>
        <thead className="border-b border-ink/10 text-ink-soft">
          <tr>
            <th className="py-2 pr-3 font-bold">Version</th>
            <th className="py-2 pr-3 font-bold">From model</th>
            <th className="py-2 pr-3 font-bold">Published</th>
            <th className="hidden py-2 pr-3 font-bold md:table-cell">Checksum</th>
            <th className="py-2 font-bold"><span className="sr-only">Action</span></th>
          </tr>
        </thead>
        <tbody>
          {versions.map((v) => (
            <tr key={v.id} className="border-b border-ink/5">
              <td className="py-2 pr-3 font-bold">
                v{v.number}
                {v.problem && (
                  <span className="ml-2 rounded-full bg-clay-100 px-2 py-0.5 text-xs font-bold text-clay-700" title={`This version is damaged: ${v.problem}.`}>
                    Damaged
                  </span>
                )}
              </td>
              <td className="py-2 pr-3">{v.modelName}</td>
              <td className="py-2 pr-3 text-ink-soft">{formatDateTime(v.createdAt)}</td>
              <td className="hidden py-2 pr-3 font-mono text-xs text-ink-faint md:table-cell" title={v.checksum}>{v.checksum.slice(0, 12)}…</td>
              <td className="py-2 text-right">
                {v.id === activeVersionId ? (
                  <span className={`rounded-full px-3 py-1 text-xs font-bold ${calculatorStatus === 'active' ? 'bg-moss-100 text-moss-700' : 'bg-paper-deep text-ink-soft'}`}>{servedVersionWords(calculatorStatus)}</span>
                ) : v.problem ? (
                  <span className="text-xs text-ink-faint">Cannot be served</span>
                ) : comparable && confirming === v.id ? (
                  <span role="group" aria-label={`Serve v${v.number}?`} className="inline-flex flex-wrap items-center justify-end gap-2">
                    <span className="text-xs text-ink-soft">Visitors get v{v.number} from their next answer.</span>
                    <Link className="pw-button-quiet" href={compareHref(v)}>Compare first</Link>
                    <button type="button" className="pw-button" disabled={busy || disabled} onClick={() => { setConfirming(null); void run(`/api/embeds/${embedId}/active-version`, 'PUT', { versionId: v.id }); }}>
                      Serve now
                    </button>
                    <button type="button" className="text-xs font-bold text-ink-soft underline" onClick={() => setConfirming(null)}>Cancel</button>
                  </span>
                ) : (
                  <span className="inline-flex flex-wrap items-center justify-end gap-2">
                    {comparable && (
                      <Link className="text-sm font-bold text-moss-700 underline" href={compareHref(v)} aria-label={`Compare v${v.number} with the served v${served?.number}`}>
                        Compare
                      </Link>
                    )}
                    <button type="button" className="pw-button-quiet" disabled={busy || disabled} onClick={() => (comparable ? setConfirming(v.id) : run(`/api/embeds/${embedId}/active-version`, 'PUT', { versionId: v.id }))}>
                      Serve v{v.number}
                    </button>
                  </span>
                )}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
      </div>
      <div className="flex flex-wrap items-end gap-3">
        <div className="min-w-[12rem] flex-1">
          <label htmlFor="again-model" className="pw-label">Publish a new version from</label>
          <select id="again-model" className="pw-input" value={modelId} onChange={(e) => setModelId(Number(e.target.value))} disabled={disabled}>
            {models.map((m) => (
              <option key={m.id} value={m.id}>{m.name}</option>
            ))}
          </select>
        </div>
        <button type="button" className="pw-button" disabled={busy || disabled || !modelId} onClick={() => run(`/api/embeds/${embedId}/versions`, 'POST', { mixtureModelId: modelId })}>
          Publish new version
        </button>
      </div>
      <p className="text-sm text-ink-soft">Versions never change once published: edits to a model reach visitors only when you publish again. The token stays the same.</p>
      {error && <ErrorNote message={error.message} issues={error.issues} />}
    </div>
  );
}

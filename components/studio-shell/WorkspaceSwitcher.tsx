'use client';

import { useState } from 'react';
import type { WorkspaceChoice } from '@/lib/accounts/workspaces';

/** Pick the current workspace; the server checks membership and sets the cookie. */
export function WorkspaceSwitcher({ workspaces, currentId }: { workspaces: WorkspaceChoice[]; currentId: number }) {
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<string | null>(null);
  if (workspaces.length <= 1) {
    const only = workspaces[0];
    return only ? <span className="text-sm font-bold text-ink" title={`You are ${only.role === 'owner' ? 'an owner' : 'a member'} here`}>{only.name}</span> : null;
  }
  return (
    <div className="flex items-center gap-2">
      <label htmlFor="workspace-switcher" className="sr-only">
        Workspace
      </label>
      <select
        id="workspace-switcher"
        className="rounded-full border border-ink/15 bg-white py-1.5 pl-3 pr-8 text-sm font-bold text-ink"
        value={currentId}
        disabled={busy}
        onChange={async (e) => {
          setBusy(true);
          setError(null);
          const res = await fetch('/api/workspaces/current', { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ workspaceId: Number(e.target.value) }) });
          if (res.ok) window.location.assign('/studio');
          else {
            setError(((await res.json().catch(() => null)) as { error?: { message?: string } } | null)?.error?.message ?? 'Could not switch.');
            setBusy(false);
          }
        }}
      >
        {workspaces.map((w) => (
          <option key={w.id} value={w.id}>
            {w.name} {w.role === 'owner' ? '(owner)' : '(member)'}
          </option>
        ))}
      </select>
      {error ? <span role="alert" className="text-sm text-clay-700">{error}</span> : null}
    </div>
  );
}

'use client';

import { useState } from 'react';
import Link from 'next/link';
import { signOut } from 'next-auth/react';
import { SessionRenewal } from './SessionRenewal';

/** Who is signed in, and the way out. A <details> keeps it usable without scripts for reading. */
export function UserMenu({ name, email, role }: { name: string; email: string; role: string }) {
  const initials = (name || email).split(/\s+/).map((p) => p[0]?.toUpperCase() ?? '').slice(0, 2).join('');
  const [ending, setEnding] = useState(false);
  const [problem, setProblem] = useState<string | null>(null);

  async function signOutEverywhere() {
    if (!window.confirm('Sign out on every browser and device, this one included?')) return;
    setEnding(true);
    setProblem(null);
    try {
      const res = await fetch('/api/account/sessions', { method: 'DELETE' });
      if (!res.ok && res.status !== 401) {
        const body = (await res.json().catch(() => null)) as { error?: { message?: string } } | null;
        throw new Error(body?.error?.message ?? 'Could not sign out everywhere. Please try again.');
      }
      window.location.assign('/signin');
    } catch (e) {
      setProblem((e as Error).message);
      setEnding(false);
    }
  }

  return (
    <details className="group relative">
      <summary className="flex cursor-pointer list-none items-center gap-2 rounded-full py-1 pl-1 pr-3 text-sm font-bold text-ink ring-1 ring-ink/10 hover:bg-paper-deep">
        <span aria-hidden="true" className="grid h-7 w-7 place-items-center rounded-full bg-moss-600 text-xs text-white">
          {initials}
        </span>
        <span className="max-w-[10rem] truncate">{name || email}</span>
      </summary>
      <div className="absolute right-0 z-20 mt-2 w-64 rounded-card bg-white p-4 shadow-card ring-1 ring-ink/10">
        <p className="truncate text-sm font-bold">{name}</p>
        <p className="truncate text-sm text-ink-soft">{email}</p>
        <p className="mt-1 text-xs text-ink-faint">{role}</p>
        <Link href="/studio/account" className="pw-button-quiet mt-4 w-full" onClick={(e) => e.currentTarget.closest('details')?.removeAttribute('open')}>
          Your account
        </Link>
        <button type="button" className="pw-button-quiet mt-2 w-full" onClick={() => signOut({ callbackUrl: '/' })}>
          Sign out
        </button>
        <button type="button" className="pw-button-quiet mt-2 w-full" disabled={ending} onClick={() => void signOutEverywhere()}>
          {ending ? 'Signing out everywhere…' : 'Sign out everywhere'}
        </button>
        {problem && (
          <p role="alert" className="mt-2 text-xs text-ink-soft">
            {problem}
          </p>
        )}
      </div>
      <SessionRenewal />
    </details>
  );
}

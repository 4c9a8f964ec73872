'use client';

import Link from 'next/link';
import { useEffect, useRef, useState } from 'react';
import { FormBanner, postJson } from './form-kit';
import { EmailRequestForm } from './EmailRequestForm';

/**
 * Confirms the address when the page opens with the mailed token. The POST happens
 * from the page (not on GET of the link), so mail scanners that prefetch links do
 * not use up the token.
 */
export function VerifyEmail({ token, plan }: { token: string; plan?: string }) {
  const [state, setState] = useState<{ kind: 'working' } | { kind: 'done'; email: string } | { kind: 'failed'; message: string }>({ kind: 'working' });
  const started = useRef(false);
  useEffect(() => {
    if (started.current) return;
    started.current = true;
    postJson<{ email: string }>('/api/account/verify', { token }).then((r) => setState(r.ok ? { kind: 'done', email: r.data.email } : { kind: 'failed', message: r.message }));
  }, [token]);

  if (state.kind === 'working') return <p className="text-ink-soft">Confirming your address…</p>;
  if (state.kind === 'done') {
    return (
      <div className="space-y-4">
        <FormBanner tone="success">Thank you — {state.email} is confirmed. You can sign in now.</FormBanner>
        {/* The plan picked before signing up waits on the billing page after sign-in. */}
        <Link href={`/signin?email=${encodeURIComponent(state.email)}${plan ? `&callbackUrl=${encodeURIComponent(`/studio/billing?plan=${plan}#plans`)}` : ''}`} className="pw-button">
          Sign in
        </Link>
      </div>
    );
  }
  return (
    <div className="space-y-5">
      <FormBanner>{state.message}</FormBanner>
      <p className="text-sm text-ink-soft">Enter your address and we will send a fresh link.</p>
      <EmailRequestForm endpoint="/api/account/verify/resend" submitLabel="Send a new link" />
    </div>
  );
}

'use client';

import Link from 'next/link';
import { useEffect, useState } from 'react';
import { billingRequest } from './api';

type State = 'open' | 'processing' | 'confirmed' | 'expired';
interface Status {
  state: State;
  plan: string;
  wantedPlan: string | null;
}

const POLL_MS = 1000;
const GIVE_UP_MS = 90_000;

/**
 * After the payment page sends the owner back: the redirect proves nothing, so this
 * asks Partwise (which only believes the payment service's signed webhook) until the
 * new plan is on record.
 */
export function CheckoutReturn({ sessionId, planNames }: { sessionId: string; planNames: Record<string, string> }) {
  const [status, setStatus] = useState<Status | null>(null);
  const [error, setError] = useState<string | null>(null);
  const [waitedTooLong, setWaitedTooLong] = useState(false);

  useEffect(() => {
    let stopped = false;
    const started = Date.now();
    let timer: ReturnType<typeof setTimeout> | undefined;
    async function poll() {
      try {
        const s = await billingRequest<Status>(`/api/billing/checkout/${encodeURIComponent(sessionId)}`, 'GET');
        if (stopped) return;
        setStatus(s);
        setError(null);
        if (s.state === 'confirmed' || s.state === 'expired') return;
      } catch (e) {
        if (stopped) return;
        setError((e as Error).message);
      }
      if (Date.now() - started > GIVE_UP_MS) {
        setWaitedTooLong(true);
        return;
      }
      timer = setTimeout(poll, POLL_MS);
    }
    void poll();
    return () => {
      stopped = true;
      if (timer) clearTimeout(timer);
    };
  }, [sessionId]);

  const wanted = status?.wantedPlan ? (planNames[status.wantedPlan] ?? status.wantedPlan) : 'the new plan';

  if (status?.state === 'confirmed') {
    return (
      <div role="status" className="text-center">
        <p className="text-4xl" aria-hidden>
          ✓
        </p>
        <h2 className="mt-2 text-2xl font-semibold">You are on {planNames[status.plan] ?? status.plan}</h2>
        <p className="mt-2 text-ink-soft">The payment is confirmed and the new limits apply now. A receipt is on its way to your inbox.</p>
        <Link href="/studio/billing" className="pw-button mt-6">
          Back to billing
        </Link>
      </div>
    );
  }
  if (status?.state === 'open') {
    return (
      <div role="status" className="text-center">
        <h2 className="text-2xl font-semibold">The payment is not complete</h2>
        <p className="mt-2 text-ink-soft">The checkout for {wanted} has not been paid, so nothing changed. You can return to it or start again from billing.</p>
        <Link href="/studio/billing" className="pw-button mt-6">
          Back to billing
        </Link>
      </div>
    );
  }
  if (status?.state === 'expired') {
    return (
      <div role="status" className="text-center">
        <h2 className="text-2xl font-semibold">This checkout has expired</h2>
        <p className="mt-2 text-ink-soft">Nothing was charged. Start a new one from the billing page.</p>
        <Link href="/studio/billing" className="pw-button mt-6">
          Back to billing
        </Link>
      </div>
    );
  }
  return (
    <div role="status" aria-live="polite" className="text-center">
      <div className="mx-auto h-10 w-10 animate-spin rounded-full border-4 border-moss-100 border-t-moss-600" aria-hidden />
      <h2 className="mt-4 text-2xl font-semibold">Confirming your payment…</h2>
      <p className="mt-2 text-ink-soft">
        We switch the workspace to {wanted} as soon as the payment service confirms the charge to us directly. This usually takes a few seconds; you can keep this page open.
      </p>
      {error && <p className="mt-3 text-sm font-bold text-clay-700">{error} Still trying…</p>}
      {waitedTooLong && (
        <p className="mt-3 text-sm text-ink-soft">
          This is taking longer than usual. Nothing is lost: the plan changes as soon as the confirmation arrives. <Link className="font-bold text-moss-700 underline" href="/studio/billing">Check the billing page</Link> later.
        </p>
      )}
    </div>
  );
}

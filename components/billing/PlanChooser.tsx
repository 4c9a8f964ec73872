'use client';

import { useRouter } from 'next/navigation';
import { useEffect, useRef, useState } from 'react';
import type { PlanChangePreview } from '@/lib/billing/subscriptions';
import { billingRequest } from './api';
import { formatBytes as bytes, formatCount as whole, formatDate as day, formatMoney as euros } from '@/lib/format';

interface PlanOption {
  id: string;
  name: string;
  tagline: string;
  monthlyPrice: number;
  limits: { calculators: number; answersPerMonth: number; datasetRows: number; uploadBytes: number; seats: number };
}

interface Props {
  plans: PlanOption[];
  currentPlan: string;
  /** A paid subscription exists, so changes go through it (not a new checkout). */
  paid: boolean;
  cancelAtPeriodEnd: boolean;
  periodEnd: string | null;
  /** A plan picked on the plans page before signing up: its confirm step opens by itself. */
  suggestedPlan?: string;
}

/**
 * The three plans side by side with what each allows. From the free plan, a paid
 * plan opens the payment service's checkout; between paid plans the switch happens
 * at once with the difference prorated; the free plan ends the subscription with
 * its period. Every change asks once before it is made.
 */
export function PlanChooser({ plans, currentPlan, paid, cancelAtPeriodEnd, periodEnd, suggestedPlan }: Props) {
  const router = useRouter();
  const [pending, setPending] = useState<string | null>(null);
  const [confirming, setConfirming] = useState<string | null>(null);
  const [error, setError] = useState<string | null>(null);
  // The payment service's own figures for the change on offer, fetched when the owner opens the confirm step.
  const [preview, setPreview] = useState<{ plan: string; data?: PlanChangePreview; error?: string } | null>(null);
  const current = plans.find((p) => p.id === currentPlan);

  async function openConfirm(planId: string) {
    setConfirming(planId);
    setPreview({ plan: planId });
    try {
      const { preview: data } = await billingRequest<{ preview: PlanChangePreview }>(`/api/billing/plan/preview?plan=${encodeURIComponent(planId)}`, 'GET');
      setPreview((p) => (p?.plan === planId ? { plan: planId, data } : p));
    } catch (e) {
      setPreview((p) => (p?.plan === planId ? { plan: planId, error: (e as Error).message } : p));
    }
  }

  const suggested = useRef(false);
  useEffect(() => {
    if (suggested.current || !suggestedPlan || suggestedPlan === currentPlan || !plans.some((p) => p.id === suggestedPlan)) return;
    suggested.current = true;
    void openConfirm(suggestedPlan);
    // Only once, on the page's first render.
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, []);

  async function act(planId: string) {
    setError(null);
    setPending(planId);
    try {
      if (!paid) {
        const { url } = await billingRequest<{ url: string }>('/api/billing/checkout', 'POST', { plan: planId });
        window.location.assign(url);
        return;
      }
      if (planId === currentPlan && cancelAtPeriodEnd) await billingRequest('/api/billing/resume', 'POST');
      else await billingRequest('/api/billing/plan', 'POST', { plan: planId });
      setConfirming(null);
      router.refresh();
    } catch (e) {
      setError((e as Error).message);
    } finally {
      setPending(null);
    }
  }

  function consequence(target: PlanOption): string {
    if (!paid) return `You will pay ${euros(target.monthlyPrice)} a month by card on the payment page. The plan starts once the payment is confirmed.`;
    if (target.monthlyPrice === 0) return `Your ${current?.name} plan stays until ${day(periodEnd)}; then the workspace moves to ${target.name} and nothing more is charged.`;
    if (current && target.monthlyPrice > current.monthlyPrice) return `The switch is immediate. You are charged now for the rest of this period at the ${target.name} price, less what is unused of ${current.name}.`;
    return `The switch is immediate. What is unused of ${current?.name} becomes credit for your next invoices.`;
  }

  return (
    <div>
      {error && (
        <div role="alert" className="mb-4 rounded-lg border border-clay-500/30 bg-clay-100 px-4 py-3 text-sm font-bold text-clay-700">
          {error}
        </div>
      )}
      <ul className="grid gap-4 md:grid-cols-3">
        {plans.map((p) => {
          const isCurrent = p.id === currentPlan;
          const resumable = isCurrent && paid && cancelAtPeriodEnd;
          const endingHere = !isCurrent && paid && cancelAtPeriodEnd && p.monthlyPrice === 0;
          let label: string | null = null;
          if (resumable) label = `Keep ${p.name}`;
          else if (isCurrent || endingHere) label = null;
          else if (!paid) label = p.monthlyPrice === 0 ? null : `Upgrade to ${p.name}`;
          else label = p.monthlyPrice === 0 ? `Cancel — move to ${p.name}` : `Switch to ${p.name}`;
          return (
            <li key={p.id} data-plan={p.id} className={`flex flex-col rounded-card p-5 ring-1 ${isCurrent ? 'bg-moss-50 ring-moss-300' : 'bg-white ring-ink/10'}`}>
              <div className="flex items-baseline justify-between gap-2">
                <h3 className="text-lg font-semibold">{p.name}</h3>
                {isCurrent && <span className="rounded-full bg-moss-600 px-2.5 py-0.5 text-xs font-bold text-white">Current</span>}
                {endingHere && <span className="rounded-full bg-saffron-100 px-2.5 py-0.5 text-xs font-bold text-saffron-700">From {day(periodEnd)}</span>}
              </div>
              <p className="mt-1 text-2xl font-semibold tabular-nums">
                {p.monthlyPrice === 0 ? 'Free' : euros(p.monthlyPrice)}
                {p.monthlyPrice > 0 && <span className="text-sm font-normal text-ink-soft"> / month</span>}
              </p>
              <p className="mt-1 text-sm text-ink-soft">{p.tagline}</p>
              <dl className="mt-3 space-y-1 text-sm">
                <Limit label="Published calculators" value={whole(p.limits.calculators)} />
                <Limit label="Answers a month" value={whole(p.limits.answersPerMonth)} />
                <Limit label="Rows per dataset" value={whole(p.limits.datasetRows)} />
                <Limit label="Upload size" value={bytes(p.limits.uploadBytes)} />
                <Limit label="Seats" value={whole(p.limits.seats)} />
              </dl>
              <div className="mt-auto pt-4">
                {label && confirming !== p.id && (
                  <button type="button" className={p.monthlyPrice === 0 ? 'pw-button-quiet w-full' : 'pw-button w-full'} disabled={pending !== null} onClick={() => (resumable ? act(p.id) : openConfirm(p.id))}>
                    {pending === p.id ? 'Working…' : label}
                  </button>
                )}
                {confirming === p.id && (
                  <div className="rounded-lg bg-paper p-3 text-sm ring-1 ring-ink/10">
                    {p.id === suggestedPlan && <p className="mb-2 font-bold text-moss-700">You picked {p.name} when you signed up.</p>}
                    <p>{consequence(p)}</p>
                    <PreviewFigures preview={preview?.plan === p.id ? preview : null} />
                    <div className="mt-3 flex gap-2">
                      <button type="button" className="pw-button" disabled={pending !== null || !(preview?.plan === p.id && preview.data)} onClick={() => act(p.id)}>
                        {pending === p.id ? 'Working…' : !paid ? 'Go to payment' : 'Confirm'}
                      </button>
                      <button type="button" className="pw-button-quiet" disabled={pending !== null} onClick={() => setConfirming(null)}>
                        Not now
                      </button>
                    </div>
                  </div>
                )}
              </div>
            </li>
          );
        })}
      </ul>
    </div>
  );
}

/** The amounts of a change, as the payment service will invoice them, shown before Confirm. */
function PreviewFigures({ preview }: { preview: { data?: PlanChangePreview; error?: string } | null }) {
  if (!preview || (!preview.data && !preview.error)) return <p className="mt-2 text-ink-soft" role="status">Working out the amount…</p>;
  if (preview.error) return <p className="mt-2 font-bold text-clay-700" role="alert">{preview.error}</p>;
  const d = preview.data!;
  const money = (c: number) => euros(c, d.currency);
  if (d.kind === 'ends') return <p className="mt-2 font-bold" data-testid="change-amount">Nothing is charged for this change.</p>;
  return (
    <div className="mt-2 space-y-1" data-testid="change-preview">
      {d.kind === 'prorated' && d.lines.length > 0 && (
        <ul className="space-y-0.5 text-ink-soft">
          {d.lines.map((l, i) => (
            <li key={i} className="flex justify-between gap-3">
              <span>{l.description}</span>
              <span className="whitespace-nowrap tabular-nums">{money(l.amount)}</span>
            </li>
          ))}
        </ul>
      )}
      {d.creditUsed > 0 && (
        <p className="flex justify-between gap-3 text-ink-soft">
          <span>Credit on account used</span>
          <span className="whitespace-nowrap tabular-nums">{money(-d.creditUsed)}</span>
        </p>
      )}
      <p className="flex justify-between gap-3 font-bold" data-testid="change-amount">
        <span>{d.kind === 'checkout' ? 'To pay on the payment page' : 'Charged to your card now'}</span>
        <span className="whitespace-nowrap tabular-nums">{money(d.amountDue)}</span>
      </p>
      {d.creditAfter > 0 && (
        <p className="flex justify-between gap-3 font-bold text-moss-700" data-testid="change-credit">
          <span>Credit kept for your next invoices</span>
          <span className="whitespace-nowrap tabular-nums">{money(d.creditAfter)}</span>
        </p>
      )}
    </div>
  );
}

function Limit({ label, value }: { label: string; value: string }) {
  return (
    <div className="flex justify-between gap-3">
      <dt className="text-ink-soft">{label}</dt>
      <dd className="font-bold tabular-nums">{value}</dd>
    </div>
  );
}

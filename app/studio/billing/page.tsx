import type { Metadata } from 'next';
import { pageWorkspace } from '@/lib/auth/page';
import { billingSummary, listInvoices } from '@/lib/billing/summary';
import { PLANS } from '@/lib/plans';
import { wantedPlan } from '@/lib/accounts/schemas';
import { Section, StudioPage } from '@/components/studio/StudioPage';
import { InvoiceTable } from '@/components/billing/InvoiceTable';
import { PlanChooser } from '@/components/billing/PlanChooser';
import { SelfServiceButton } from '@/components/billing/SelfServiceButton';
import { UsageMeters } from '@/components/billing/UsageMeters';
import { ScoringAlerts } from '@/components/billing/ScoringAlerts';
import { PAUSE_ALERT_THRESHOLD, recentScoringAlerts } from '@/lib/scoring/alerts';
import { formatDate as day, formatMoney as euros } from '@/lib/format';

export const metadata: Metadata = { title: 'Billing' };
export const dynamic = 'force-dynamic';

const STATUS_TEXT: Record<string, string> = {
  active: 'Active',
  trialing: 'Trial',
  past_due: 'Payment overdue — the payment service is retrying the card',
  canceled: 'Ended',
  incomplete: 'Waiting for the first payment',
};

export default async function BillingPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  // A member is sent back to the studio with the owners-only notice (lib/auth/page.ts).
  const actor = await pageWorkspace('owner', '/studio/billing');
  const [summary, invoices, alerts, params] = await Promise.all([billingSummary(actor.workspace.id), listInvoices(actor.workspace.id), recentScoringAlerts(actor.workspace.id), searchParams]);
  const { plan, subscription: sub } = summary;
  const cancelled = params.checkout === 'cancelled';

  return (
    <StudioPage title="Billing" lead={`Plan, usage and invoices of ${actor.workspace.name}. Amounts are in euros and include everything charged.`}>
      {cancelled && (
        <p role="status" className="rounded-lg bg-saffron-100 px-4 py-3 text-sm font-bold text-saffron-700">
          The checkout was left without paying. Nothing was charged and the plan is unchanged.
        </p>
      )}
      {summary.answers.state === 'paused' && (
        <p role="alert" className="rounded-lg border border-clay-500/30 bg-clay-100 px-4 py-3 text-sm font-bold text-clay-700">
          Your calculators have used this month&apos;s answers and the grace after them, so visitors now see a neutral “temporarily unavailable” notice. They answer again on the first of next month, or at once after an upgrade.
        </p>
      )}
      <Section title="Your plan" id="plan">
        <div className="flex flex-wrap items-end justify-between gap-6">
          <div>
            <p className="text-3xl font-semibold" data-testid="current-plan">
              {plan.name}
            </p>
            <p className="mt-1 text-ink-soft">
              {plan.monthlyPrice === 0 ? 'Free, no card on file needed.' : `${euros(plan.monthlyPrice)} a month · ${STATUS_TEXT[sub.status] ?? sub.status}`}
            </p>
            {sub.paid && sub.currentPeriodEnd && (
              <p className="mt-1 text-sm text-ink-soft">
                {sub.cancelAtPeriodEnd ? (
                  <span className="font-bold text-saffron-700">
                    Ends on {day(sub.currentPeriodEnd)}; the workspace then moves to {PLANS.sketch.name}.
                  </span>
                ) : (
                  <>Renews on {day(sub.currentPeriodEnd)}.</>
                )}
              </p>
            )}
          </div>
          {summary.credit > 0 && (
            <p className="rounded-lg bg-moss-50 px-4 py-3 text-sm" data-testid="credit">
              <span className="block font-bold text-moss-900">Credit on account: {euros(summary.credit)}</span>
              <span className="text-ink-soft">Left by an earlier plan change; it is used first on your next invoices.</span>
            </p>
          )}
          {sub.paid && <SelfServiceButton />}
        </div>
      </Section>

      <Section title="This month's usage" id="usage" lead={`Counted for ${summary.period}. The answer count starts again on the first of each month.`}>
        <UsageMeters meters={summary.usage} pauseAt={summary.answers.pauseAt} />
      </Section>

      <Section title="Scoring alerts" id="alerts" lead="When a calculator is asked for answers faster than fair use allows, or the month's answers run low, we e-mail the owners and note it here.">
        <ScoringAlerts alerts={alerts} pauseThreshold={PAUSE_ALERT_THRESHOLD} />
      </Section>

      <Section title="Change plan" id="plans" lead={sub.paid ? 'Switching between paid plans takes effect at once; the payment service prorates the difference.' : 'Paid plans are paid by card on the payment service’s page.'}>
        <PlanChooser
          plans={summary.plans.map((p) => ({ ...p, tagline: PLANS[p.id].tagline }))}
          currentPlan={plan.id}
          paid={sub.paid}
          cancelAtPeriodEnd={sub.cancelAtPeriodEnd}
          periodEnd={sub.currentPeriodEnd}
          suggestedPlan={wantedPlan.safeParse(params.plan).data}
        />
      </Section>

      <Section title="Invoices" id="invoices" lead="Each paid invoice is also e-mailed to the owners as a receipt.">
        <InvoiceTable invoices={invoices} />
      </Section>
    </StudioPage>
  );
}

import type { Metadata } from 'next';
import { pageWorkspace } from '@/lib/auth/page';
import { PLAN_IDS, PLANS } from '@/lib/plans';
import { StudioPage } from '@/components/studio/StudioPage';
import { CheckoutReturn } from '@/components/billing/CheckoutReturn';

export const metadata: Metadata = { title: 'Confirming payment' };
export const dynamic = 'force-dynamic';

export default async function CheckoutReturnPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const params = await searchParams;
  const sessionId = typeof params.session_id === 'string' ? params.session_id : '';
  // A member is sent back to the studio with the owners-only notice (lib/auth/page.ts).
  await pageWorkspace('owner', `/studio/billing/return?session_id=${encodeURIComponent(sessionId)}`);
  const planNames = Object.fromEntries(PLAN_IDS.map((id) => [id, PLANS[id].name]));
  return (
    <StudioPage title="Checkout" trail={[{ href: '/studio/billing', label: 'Billing' }]}>
      <div className="pw-card mx-auto max-w-xl p-10">
        {/^cs_[A-Za-z0-9_]+$/.test(sessionId) ? (
          <CheckoutReturn sessionId={sessionId} planNames={planNames} />
        ) : (
          <p role="alert" className="text-center text-ink-soft">
            This address is missing its checkout reference. Open the billing page to see your current plan.
          </p>
        )}
      </div>
    </StudioPage>
  );
}

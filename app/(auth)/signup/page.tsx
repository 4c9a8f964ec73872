import type { Metadata } from 'next';
import Link from 'next/link';
import { AuthPanel } from '@/components/account/AuthPanel';
import { SignUpForm } from '@/components/account/SignUpForm';
import { pageActor } from '@/lib/auth/page';
import { devMailAllowed } from '@/lib/mail/dev';
import { wantedPlan } from '@/lib/accounts/schemas';
import { PLANS, formatPrice } from '@/lib/plans';

export const metadata: Metadata = { title: 'Create your account' };
// Whether the local mail sink may be linked is decided per request (bound address, viewer).
export const dynamic = 'force-dynamic';

export default async function SignUpPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const showMailSink = await devMailAllowed({ viewerIsStaff: async () => (await pageActor())?.isStaff === true });
  // A paid plan chosen on the plans page; anything else is simply the free start.
  const asked = wantedPlan.safeParse((await searchParams).plan);
  const plan = asked.success ? PLANS[asked.data] : null;
  return (
    <AuthPanel
      title="Start with Partwise"
      lead={
        plan
          ? `You chose ${plan.name} (${formatPrice(plan.monthlyPrice)} a month). Create the account first; once you have confirmed your e-mail and signed in, the billing page opens with ${plan.name} ready to pay. Nothing is charged before that.`
          : 'Free on the Sketch plan: upload a table, find its groups, share one calculator.'
      }
      footer={
        <>
          Already have an account?{' '}
          <Link href="/signin" className="font-bold text-moss-700 hover:underline">
            Sign in
          </Link>
        </>
      }
    >
      <SignUpForm showMailSink={showMailSink} plan={asked.success ? asked.data : undefined} />
    </AuthPanel>
  );
}

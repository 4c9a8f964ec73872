import type { Metadata } from 'next';
import Link from 'next/link';
import { redirect } from 'next/navigation';
import { deletionPlan } from '@/lib/accounts/account';
import { pageActor } from '@/lib/auth/page';
import { formatDate } from '@/lib/format';
import { DeleteAccountForm, NameForm, PasswordForm } from '@/components/studio/AccountSettings';
import { Section, StudioPage } from '@/components/studio/StudioPage';

export const metadata: Metadata = { title: 'Your account' };
export const dynamic = 'force-dynamic';

/** The signed-in person's own settings: name, password, and leaving Partwise. */
export default async function AccountPage() {
  const actor = await pageActor();
  if (!actor) redirect('/signin?callbackUrl=%2Fstudio%2Faccount');
  const { user } = actor;
  const plan = await deletionPlan(user.id);
  const names = (list: { name: string }[]) => list.map((w) => w.name).join(', ');
  return (
    <StudioPage title="Your account" lead={`Signed in as ${user.email} · with Partwise since ${formatDate(user.createdAt)}`}>
      <Section title="Name" id="name">
        <NameForm name={user.name} />
      </Section>
      <Section title="Password" id="password" lead="You need your current password to set a new one. Forgot it? Sign out and use “Forgot your password?” on the sign-in page.">
        <PasswordForm email={user.email} />
      </Section>
      <Section title="Delete your account" id="delete" lead="This cannot be undone. Your sessions end and you can no longer sign in with this address.">
        <div className="mb-5 max-w-2xl space-y-3 text-sm" data-testid="deletion-plan">
          {plan.blockers.length > 0 ? (
            <div role="alert" className="rounded-lg border-2 border-clay-500 bg-clay-100 px-4 py-3 text-clay-700">
              <p className="font-bold">Before you can delete your account</p>
              <ul className="mt-1 list-disc space-y-1 pl-5">
                {plan.blockers.map((b) => (
                  <li key={b.workspaceId}>{b.reason}</li>
                ))}
              </ul>
              <p className="mt-2">
                {plan.blockers.some((b) => b.kind === 'only-owner') && (
                  <>
                    People are managed on a workspace&rsquo;s <Link href="/studio/team" className="font-bold underline">Team page</Link>.{' '}
                  </>
                )}
                {plan.blockers.some((b) => b.kind === 'paid-plan') && (
                  <>
                    The plan is on its <Link href="/studio/billing" className="font-bold underline">Billing page</Link>.{' '}
                  </>
                )}
                {plan.blockers.length > 0 && 'If it is not the current workspace, switch to it with the workspace menu at the top first.'}
              </p>
            </div>
          ) : null}
          {plan.leftWorkspaces.length > 0 && <p className="text-ink-soft">You leave {names(plan.leftWorkspaces)}. What you uploaded, fitted and published there stays with the workspace.</p>}
          {plan.deletedWorkspaces.length > 0 && (
            <p className="font-bold text-clay-700">
              You are the only person in {names(plan.deletedWorkspaces)}, so {plan.deletedWorkspaces.length === 1 ? 'it is' : 'they are'} deleted too: datasets, fits, models and calculators (websites showing them get the &ldquo;not available&rdquo; notice).
            </p>
          )}
          <p className="text-ink-faint">The record of what was done in a workspace (its audit trail) keeps your address, so the history of each workspace stays complete.</p>
        </div>
        <DeleteAccountForm email={user.email} blocked={plan.blockers.length > 0} />
      </Section>
    </StudioPage>
  );
}

import type { Metadata } from 'next';
import Link from 'next/link';
import { AcceptInvitation } from '@/components/account/AcceptInvitation';
import { AuthPanel } from '@/components/account/AuthPanel';
import { FormBanner } from '@/components/account/form-kit';
import { describeInvitation, type InvitationSummary } from '@/lib/accounts/invitations';
import { pageActor } from '@/lib/auth/page';
import { AppError } from '@/lib/errors';

export const metadata: Metadata = { title: 'Join a workspace' };
export const dynamic = 'force-dynamic';

export default async function InvitePage({ searchParams }: { searchParams: Promise<Record<string, string | undefined>> }) {
  const { token } = await searchParams;
  let invitation: InvitationSummary | null = null;
  let problem = 'This page needs the link from your invitation mail.';
  if (token) {
    try {
      invitation = await describeInvitation(token);
    } catch (e) {
      if (!(e instanceof AppError)) throw e;
      problem = e.message;
    }
  }
  if (!token || !invitation) {
    return (
      <AuthPanel title="This invitation cannot be used" footer={<Link href="/signin" className="font-bold text-moss-700 hover:underline">Go to sign in</Link>}>
        <FormBanner>{problem}</FormBanner>
      </AuthPanel>
    );
  }
  const actor = await pageActor();
  return (
    <AuthPanel
      title={`Join ${invitation.workspaceName}`}
      lead={
        <>
          {invitation.inviterName || 'A colleague'} invited <strong className="text-ink">{invitation.email}</strong> to work in this workspace as {invitation.role === 'owner' ? 'an owner' : 'a member'}. The invitation is valid until {invitation.expiresAt.slice(0, 10)}.
        </>
      }
    >
      <AcceptInvitation token={token} invitation={invitation} signedInAs={actor?.user.email ?? null} />
    </AuthPanel>
  );
}

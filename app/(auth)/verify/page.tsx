import type { Metadata } from 'next';
import Link from 'next/link';
import { AuthPanel } from '@/components/account/AuthPanel';
import { EmailRequestForm } from '@/components/account/EmailRequestForm';
import { VerifyEmail } from '@/components/account/VerifyEmail';
import { pageActor } from '@/lib/auth/page';
import { devMailAllowed } from '@/lib/mail/dev';
import { wantedPlan } from '@/lib/accounts/schemas';

export const metadata: Metadata = { title: 'Confirm your e-mail' };
export const dynamic = 'force-dynamic';

export default async function VerifyPage({ searchParams }: { searchParams: Promise<Record<string, string | undefined>> }) {
  const { token, email, sent, plan } = await searchParams;
  if (token) {
    const asked = wantedPlan.safeParse(plan);
    return (
      <AuthPanel title="Confirming your e-mail">
        <VerifyEmail token={token} plan={asked.success ? asked.data : undefined} />
      </AuthPanel>
    );
  }
  // The same rule as /dev/mail itself: never point at a page that would answer 404.
  const showMailSink = await devMailAllowed({ viewerIsStaff: async () => (await pageActor())?.isStaff === true });
  return (
    <AuthPanel
      title={sent ? 'Check your inbox' : 'Confirm your e-mail'}
      lead={
        sent ? (
          <>
            We sent a mail to <strong className="text-ink">{email ?? 'your address'}</strong>. Open the link in it to finish, then sign in.
          </>
        ) : (
          'Lost the mail, or the link expired? We will send a fresh one.'
        )
      }
      footer={
        <Link href="/signin" className="font-bold text-moss-700 hover:underline">
          Back to sign in
        </Link>
      }
    >
      {showMailSink ? (
        <p className="mb-5 rounded-lg bg-saffron-100 px-4 py-3 text-sm text-ink">
          Local run: mail goes to the local mail sink, not the internet.{' '}
          <Link href="/dev/mail" className="font-bold underline">
            Open the mail sink
          </Link>
        </p>
      ) : null}
      <p className="mb-3 text-sm text-ink-soft">{sent ? 'Nothing arrived after a few minutes? Check spam, or send it again:' : ''}</p>
      <EmailRequestForm endpoint="/api/account/verify/resend" submitLabel="Send a new link" defaultEmail={email} />
    </AuthPanel>
  );
}

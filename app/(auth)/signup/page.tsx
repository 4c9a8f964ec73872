import type { Metadata } from 'next';
import Link from 'next/link';
import { AuthPanel } from '@/components/account/AuthPanel';
import { SignUpForm } from '@/components/account/SignUpForm';
import { pageActor } from '@/lib/auth/page';
import { devMailAllowed } from '@/lib/mail/dev';

export const metadata: Metadata = { title: 'Create your account' };
// Whether the local mail sink may be linked is decided per request (bound address, viewer).
export const dynamic = 'force-dynamic';

export default async function SignUpPage() {
  const showMailSink = await devMailAllowed({ viewerIsStaff: async () => (await pageActor())?.isStaff === true });
  return (
    <AuthPanel
      title="Start with Partwise"
      lead="Free on the Sketch plan: upload a table, find its groups, share one calculator."
      footer={
        <>
          Already have an account?{' '}
          <Link href="/signin" className="font-bold text-moss-700 hover:underline">
            Sign in
          </Link>
        </>
      }
    >
      <SignUpForm showMailSink={showMailSink} />
    </AuthPanel>
  );
}

import type { Metadata } from 'next';
import Link from 'next/link';
import { redirect } from 'next/navigation';
import { AuthPanel } from '@/components/account/AuthPanel';
import { SignInForm } from '@/components/account/SignInForm';
import { safeReturnPath } from '@/lib/accounts/return-path';
import { pageActor } from '@/lib/auth/page';

export const metadata: Metadata = { title: 'Sign in' };
export const dynamic = 'force-dynamic';

export default async function SignInPage({ searchParams }: { searchParams: Promise<Record<string, string | undefined>> }) {
  const params = await searchParams;
  const callbackUrl = safeReturnPath(params.callbackUrl);
  if (await pageActor()) redirect(callbackUrl);
  return (
    <AuthPanel
      title="Welcome back"
      lead="Sign in to your workspace."
      footer={
        <>
          New to Partwise?{' '}
          <Link href="/signup" className="font-bold text-moss-700 hover:underline">
            Create an account
          </Link>
        </>
      }
    >
      <SignInForm callbackUrl={callbackUrl} initialError={params.error} defaultEmail={params.email} />
    </AuthPanel>
  );
}

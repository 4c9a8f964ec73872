import type { Metadata } from 'next';
import Link from 'next/link';
import { AuthPanel } from '@/components/account/AuthPanel';
import { ResetPasswordForm } from '@/components/account/ResetPasswordForm';

export const metadata: Metadata = { title: 'Choose a new password' };
export const dynamic = 'force-dynamic';

export default async function ResetPasswordPage({ searchParams }: { searchParams: Promise<Record<string, string | undefined>> }) {
  const { token } = await searchParams;
  return (
    <AuthPanel title="Choose a new password" lead={token ? 'Pick something you do not use elsewhere.' : undefined}>
      {token ? (
        <ResetPasswordForm token={token} />
      ) : (
        <p className="text-ink-soft">
          This page needs the link from the reset mail.{' '}
          <Link href="/forgot-password" className="font-bold text-moss-700 hover:underline">
            Ask for a link
          </Link>
        </p>
      )}
    </AuthPanel>
  );
}

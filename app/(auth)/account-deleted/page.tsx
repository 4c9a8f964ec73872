import type { Metadata } from 'next';
import Link from 'next/link';
import { AuthPanel } from '@/components/account/AuthPanel';

export const metadata: Metadata = { title: 'Account deleted' };

/** Where a deleted account lands: the session is gone, so say so plainly and offer the ways on. */
export default function AccountDeletedPage() {
  return (
    <AuthPanel title="Your account is deleted" lead="You are signed out, and this address can no longer sign in. Workspaces you shared keep what you made there.">
      <div className="flex flex-wrap gap-3">
        <Link href="/" className="pw-button">
          Partwise home
        </Link>
        <Link href="/signup" className="pw-button-quiet">
          Start a new account
        </Link>
      </div>
    </AuthPanel>
  );
}

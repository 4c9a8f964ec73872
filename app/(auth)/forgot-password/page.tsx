import type { Metadata } from 'next';
import Link from 'next/link';
import { AuthPanel } from '@/components/account/AuthPanel';
import { EmailRequestForm } from '@/components/account/EmailRequestForm';

export const metadata: Metadata = { title: 'Forgot your password' };

export default function ForgotPasswordPage() {
  return (
    <AuthPanel
      title="Forgot your password?"
      lead="Enter the address you sign in with. We will mail you a link to choose a new password; it works for one hour."
      footer={
        <Link href="/signin" className="font-bold text-moss-700 hover:underline">
          Back to sign in
        </Link>
      }
    >
      <EmailRequestForm endpoint="/api/account/password/forgot" submitLabel="Mail me a link" />
    </AuthPanel>
  );
}

import type { Metadata } from 'next';
import Link from 'next/link';
import { AuthPanel } from '@/components/account/AuthPanel';
import { SignUpForm } from '@/components/account/SignUpForm';

export const metadata: Metadata = { title: 'Create your account' };

export default function SignUpPage() {
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
      <SignUpForm />
    </AuthPanel>
  );
}

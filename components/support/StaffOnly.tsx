import Link from 'next/link';

/** Shown when someone who is not Partwise staff opens a support page. */
export function StaffOnly() {
  return (
    <div className="mx-auto max-w-xl py-8">
      <div className="pw-card p-8">
        <h1 className="text-2xl font-semibold">Support is for Partwise staff</h1>
        <p className="mt-3 text-ink-soft">This part of Partwise is where our support team looks after published calculators. Your own calculators, usage and billing are in the studio.</p>
        <Link href="/studio" className="pw-button-quiet mt-6">
          Back to the studio
        </Link>
      </div>
    </div>
  );
}

import Link from 'next/link';

/** Shown to members who open a billing page: only owners manage billing. */
export function OwnerOnly({ workspaceName }: { workspaceName?: string }) {
  return (
    <div className="mx-auto max-w-xl px-6 py-16">
      <div className="pw-card p-8">
        <h1 className="text-2xl font-semibold">Billing is for the workspace owner</h1>
        <p className="mt-3 text-ink-soft">
          Plans, payment and invoices{workspaceName ? ` of ${workspaceName}` : ''} are managed by its owner. Ask them if you need a higher limit.
        </p>
        <Link href="/studio/datasets" className="pw-button-quiet mt-6">
          Back to the studio
        </Link>
      </div>
    </div>
  );
}

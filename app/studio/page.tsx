import type { Metadata } from 'next';
import Link from 'next/link';
import { workspaceCounts } from '@/lib/accounts/overview';
import { pageActor, pageCurrentWorkspace } from '@/lib/auth/page';
import { workspacePlan } from '@/lib/billing/limits';

export const metadata: Metadata = { title: 'Studio' };
export const dynamic = 'force-dynamic';

const NOTICES: Record<string, string> = {
  'owners-only': 'That page is for the owners of this workspace. Ask an owner if you need something changed there.',
};

export default async function StudioOverview({ searchParams }: { searchParams: Promise<Record<string, string | undefined>> }) {
  const { notice } = await searchParams;
  const current = await pageCurrentWorkspace();
  if (!current) {
    const actor = await pageActor();
    return (
      <section className="pw-card max-w-2xl p-8">
        <h1 className="text-3xl font-bold">{actor?.isStaff ? 'Support staff' : 'No workspace yet'}</h1>
        <p className="mt-3 text-ink-soft">
          {actor?.isStaff
            ? 'Staff accounts do not belong to workspaces. Calculators, usage and reports of every workspace are in Support.'
            : 'You are not in any workspace right now, perhaps because an owner removed you. Ask an owner for a new invitation.'}
        </p>
        {actor?.isStaff ? (
          <Link href="/support" className="pw-button mt-6">
            Open Support
          </Link>
        ) : null}
      </section>
    );
  }
  const [counts, plan] = await Promise.all([workspaceCounts(current.workspace.id), workspacePlan(current.workspace.id)]);
  const tiles = [
    { href: '/studio/datasets', label: 'Datasets', count: counts.datasets, blurb: 'Measurement tables you uploaded.' },
    { href: '/studio/fits', label: 'Fits', count: counts.fits, blurb: 'Mixture fits, running and finished.' },
    { href: '/studio/calculators', label: 'Calculators', count: counts.calculators, blurb: 'Published calculators, embeddable anywhere.' },
  ];
  return (
    <div className="space-y-8">
      {notice && NOTICES[notice] ? (
        <p role="status" className="rounded-lg bg-saffron-100 px-4 py-3 text-sm text-ink ring-1 ring-saffron-500/30">
          {NOTICES[notice]}
        </p>
      ) : null}
      <div>
        <p className="text-sm font-bold uppercase tracking-wide text-moss-700">{plan.name} plan · you are {current.role === 'owner' ? 'an owner' : 'a member'}</p>
        <h1 className="mt-1 text-4xl font-bold">{current.workspace.name}</h1>
      </div>
      <ul className="grid gap-4 sm:grid-cols-3">
        {tiles.map((t) => (
          <li key={t.href}>
            <Link href={t.href} className="pw-card block p-6 transition hover:ring-moss-300">
              <span className="block font-display text-4xl font-bold text-ink">{t.count}</span>
              <span className="mt-1 block font-bold">{t.label}</span>
              <span className="mt-1 block text-sm text-ink-soft">{t.blurb}</span>
            </Link>
          </li>
        ))}
      </ul>
      {counts.datasets === 0 ? (
        <section className="pw-card p-6">
          <h2 className="text-xl font-bold">Start with a table</h2>
          <p className="mt-2 text-ink-soft">Upload a CSV of measurements — one row per person or item, one column per feature — and Partwise finds the groups in it.</p>
          <Link href="/studio/datasets" className="pw-button mt-4">
            Upload a dataset
          </Link>
        </section>
      ) : null}
    </div>
  );
}

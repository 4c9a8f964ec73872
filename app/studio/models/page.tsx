import Link from 'next/link';
import type { Metadata } from 'next';
import { pageWorkspace } from '@/lib/auth/page';
import { listModels } from '@/lib/fitting/models';
import { Section, StudioPage } from '@/components/studio/StudioPage';

export const metadata: Metadata = { title: 'Models' };
export const dynamic = 'force-dynamic';

export default async function ModelsPage() {
  const actor = await pageWorkspace('member', '/studio/models');
  const models = await listModels(actor.workspace.id);
  return (
    <StudioPage title="Models" lead="Fitted mixtures you kept, with named clusters, ready to publish as calculators.">
      <Section title="Kept models" id="models">
        {models.length === 0 ? (
          <p className="text-ink-soft">
            None yet. Fit a <Link className="font-bold text-moss-700 underline" href="/studio/datasets">dataset</Link> and keep the candidate you like.
          </p>
        ) : (
          <ul className="divide-y divide-ink/5">
            {models.map((m) => (
              <li key={m.id} className="flex flex-wrap items-baseline gap-x-4 gap-y-1 py-3">
                <Link href={`/studio/models/${m.id}`} className="font-bold text-moss-700 hover:underline">
                  {m.name}
                </Link>
                <span className="text-sm text-ink-soft">
                  {m.components} clusters, {m.structure} · {m.features.join(', ')}
                </span>
                <span className="w-full text-sm text-ink-faint">{m.clusters.join(' · ')}</span>
              </li>
            ))}
          </ul>
        )}
      </Section>
    </StudioPage>
  );
}

import Link from 'next/link';
import type { Metadata } from 'next';
import { pageWorkspace } from '@/lib/auth/page';
import { calculatorList } from '@/lib/embeds/studio-queries';
import { PublishForm } from '@/components/calculators/PublishForm';
import { StatusPill } from '@/components/calculators/StatusPill';
import { Section, StudioPage } from '@/components/studio/StudioPage';
import { formatCount } from '@/lib/format';

export const metadata: Metadata = { title: 'Calculators' };
export const dynamic = 'force-dynamic';

export default async function CalculatorsPage({ searchParams }: { searchParams: Promise<{ model?: string }> }) {
  const actor = await pageWorkspace('member', '/studio/calculators');
  // The model page's "Publish" action opens this form with its model chosen.
  const wanted = Number((await searchParams).model) || undefined;
  const { rows, models } = await calculatorList(actor.workspace.id);
  return (
    <StudioPage title="Calculators" lead="Published models that visitors of your websites can use. Each has its own address, versions and list of websites allowed to show it.">
      <Section title="Publish a model" id="publish">
        <PublishForm models={models} defaultModelId={wanted} />
      </Section>
      <Section title="Published" id="published" lead={rows.length ? `${rows.length} in ${actor.workspace.name}` : undefined}>
        {rows.length === 0 ? (
          <p className="text-ink-soft">Nothing published yet.</p>
        ) : (
          <div className="overflow-x-auto">
            <table className="w-full min-w-[36rem] text-left text-sm">
              <thead className="border-b border-ink/10 text-ink-soft">
                <tr>
                  <th className="py-2 pr-4 font-bold">Title</th>
                  <th className="py-2 pr-4 font-bold">Status</th>
                  <th className="py-2 pr-4 font-bold">Serves</th>
                  <th className="py-2 pr-4 text-right font-bold">Websites</th>
                  <th className="py-2 text-right font-bold">Answers this month</th>
                </tr>
              </thead>
              <tbody>
                {rows.map((r) => (
                  <tr key={r.id} className="border-b border-ink/5">
                    <td className="py-2 pr-4">
                      <Link href={`/studio/calculators/${r.id}`} className="font-bold text-moss-700 hover:underline">{r.title}</Link>
                    </td>
                    <td className="py-2 pr-4"><StatusPill status={r.status} /></td>
                    <td className="py-2 pr-4">{r.servedVersion ? `v${r.servedVersion}` : '—'}</td>
                    <td className="py-2 pr-4 text-right tabular-nums">{r.origins > 0 ? formatCount(r.origins) : r.status === 'retired' ? '—' : <span className="font-bold text-clay-700">none yet</span>}</td>
                    <td className="py-2 text-right tabular-nums">{formatCount(r.answersThisMonth)}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        )}
      </Section>
    </StudioPage>
  );
}

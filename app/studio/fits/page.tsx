import Link from 'next/link';
import type { Metadata } from 'next';
import { pageWorkspace } from '@/lib/auth/page';
import { fitsPage } from '@/lib/fitting/studio-queries';
import { formatDateTime } from '@/lib/format';
import { FitStatusPill } from '@/components/studio/FitStatusPill';
import { Section, StudioPage } from '@/components/studio/StudioPage';

export const metadata: Metadata = { title: 'Fits' };
export const dynamic = 'force-dynamic';

export default async function FitsPage() {
  const actor = await pageWorkspace('member', '/studio/fits');
  const { fits, datasetNames: datasets } = await fitsPage(actor.workspace.id);
  return (
    <StudioPage title="Fits" lead="Every mixture fit of this workspace, newest first. Start a new one from a dataset.">
      <Section title="All fits" id="fits">
        {fits.length === 0 ? (
          <p className="text-ink-soft">
            No fits yet. Open a <Link className="font-bold text-moss-700 underline" href="/studio/datasets">dataset</Link> and choose “Fit mixtures”.
          </p>
        ) : (
          <div className="overflow-x-auto">
          <table className="w-full text-left text-sm">
            <thead className="border-b border-ink/10 text-ink-soft">
              <tr>
                <th className="py-2 pr-4 font-bold">Fit</th>
                <th className="py-2 pr-4 font-bold">Dataset</th>
                <th className="py-2 pr-4 font-bold">Settings</th>
                <th className="py-2 pr-4 font-bold">Started</th>
                <th className="py-2 font-bold">Status</th>
              </tr>
            </thead>
            <tbody>
              {fits.map((f) => {
                const p = f.params as { features?: string[]; minComponents?: number; maxComponents?: number; covariances?: string[] };
                const progress = f.progress as { best?: { components: number; covariance: string } | null } | null;
                return (
                  <tr key={f.id} className="border-b border-ink/5 align-top">
                    <td className="py-2 pr-4">
                      <Link href={`/studio/fits/${f.id}`} className="font-bold text-moss-700 hover:underline">
                        Fit {f.number}
                      </Link>
                    </td>
                    <td className="py-2 pr-4">{datasets.get(f.datasetId) ?? <span className="text-ink-faint">deleted</span>}</td>
                    <td className="py-2 pr-4 text-ink-soft">
                      {(p.features ?? []).length} features · {p.minComponents}–{p.maxComponents} components · {(p.covariances ?? []).join(', ')}
                      {f.status === 'succeeded' && progress?.best ? <span className="block text-xs">BIC picks {progress.best.components} × {progress.best.covariance}</span> : null}
                      {f.status === 'failed' && f.error ? <span className="block text-xs text-clay-700">{f.error}</span> : null}
                    </td>
                    <td className="py-2 pr-4 text-ink-faint">{formatDateTime(f.createdAt)}</td>
                    <td className="py-2">
                      <FitStatusPill status={f.status} />
                    </td>
                  </tr>
                );
              })}
            </tbody>
          </table>
          </div>
        )}
      </Section>
    </StudioPage>
  );
}

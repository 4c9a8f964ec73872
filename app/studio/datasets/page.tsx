import Link from 'next/link';
import type { Metadata } from 'next';
import { pageWorkspace } from '@/lib/auth/page';
import { workspacePlan } from '@/lib/billing/limits';
import { listDatasets } from '@/lib/datasets';
import { formatBytes, formatCount as count, formatDate } from '@/lib/format';
import { Section, StudioPage } from '@/components/studio/StudioPage';
import { UploadPanel } from '@/components/studio/UploadPanel';

export const metadata: Metadata = { title: 'Datasets' };
export const dynamic = 'force-dynamic';

export default async function DatasetsPage() {
  const actor = await pageWorkspace('member', '/studio/datasets');
  const [datasets, plan] = await Promise.all([listDatasets(actor.workspace.id), workspacePlan(actor.workspace.id)]);
  return (
    <StudioPage title="Datasets" lead="Tables of measurements, one row per person or thing, one column per feature. Upload one, check its columns, then fit mixtures to it.">
      <Section title="Add a table" id="upload">
        <UploadPanel maxBytesLabel={formatBytes(plan.limits.uploadBytes)} maxRowsLabel={count(plan.limits.datasetRows)} />
      </Section>
      <Section title="Your tables" id="list" lead={datasets.length ? `${datasets.length} in ${actor.workspace.name}` : undefined}>
        {datasets.length === 0 ? (
          <p className="text-ink-soft">No tables yet. Upload a CSV above; the sample ride logs are in <a className="font-bold text-moss-700 underline" href="/samples/riverside-rides.csv">riverside-rides.csv</a>.</p>
        ) : (
          <div className="overflow-x-auto">
          <table className="w-full text-left text-sm">
            <thead className="border-b border-ink/10 text-ink-soft">
              <tr>
                <th className="py-2 pr-4 text-right font-bold">No.</th>
                <th className="py-2 pr-4 font-bold">Name</th>
                <th className="py-2 pr-4 font-bold">File</th>
                <th className="py-2 pr-4 text-right font-bold">Rows</th>
                <th className="py-2 pr-4 text-right font-bold">Numeric columns</th>
                <th className="py-2 font-bold">Uploaded</th>
              </tr>
            </thead>
            <tbody>
              {datasets.map((d) => (
                <tr key={d.id} className="border-b border-ink/5">
                  <td className="py-2 pr-4 text-right tabular-nums text-ink-faint">{d.number}</td>
                  <td className="py-2 pr-4">
                    <Link className="font-bold text-moss-700 hover:underline" href={`/studio/datasets/${d.id}`}>
                      {d.name}
                    </Link>
                  </td>
                  <td className="py-2 pr-4 text-ink-soft">{d.originalFilename}</td>
                  <td className="py-2 pr-4 text-right tabular-nums">{count(d.rowCount)}</td>
                  <td className="py-2 pr-4 text-right tabular-nums">
                    {d.numericColumns} of {d.columns}
                  </td>
                  <td className="py-2 text-ink-soft">{formatDate(d.createdAt)}</td>
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

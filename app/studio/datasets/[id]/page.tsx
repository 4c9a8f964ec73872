import Link from 'next/link';
import { notFound } from 'next/navigation';
import type { Metadata } from 'next';
import { pageWorkspace } from '@/lib/auth/page';
import { AppError } from '@/lib/errors';
import { parseDecimalId } from '@/lib/http/ids';
import { findDataset } from '@/lib/datasets';
import { FIT_DEFAULTS, MAX_COMPONENTS } from '@/lib/fitting/params';
import { fitsOfDataset } from '@/lib/fitting/studio-queries';
import { ColumnTable, PreviewTable } from '@/components/studio/ColumnTable';
import { DeleteDatasetButton } from '@/components/studio/DeleteDatasetButton';
import { FeatureSettingsForm } from '@/components/studio/FeatureSettingsForm';
import { FitForm } from '@/components/studio/FitForm';
import { FitStatusPill } from '@/components/studio/FitStatusPill';
import { formatCount as count, formatDateTime } from '@/lib/format';
import { Section, StudioPage } from '@/components/studio/StudioPage';

export const metadata: Metadata = { title: 'Dataset' };
export const dynamic = 'force-dynamic';

export default async function DatasetPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  // Decimal digits only: Number() would read "0x6" or "6e0" as 6.
  const datasetId = parseDecimalId(id) ?? notFound();
  const actor = await pageWorkspace('member', `/studio/datasets/${id}`);
  const dataset = await findDataset(actor.workspace.id, datasetId).catch((e) => {
    if (e instanceof AppError && e.code === 'not_found') notFound();
    throw e;
  });
  const fits = await fitsOfDataset(actor.workspace.id, datasetId);
  const numeric = dataset.columns.filter((c) => c.kind === 'numeric');
  const complete = dataset.cells.filter((r) => dataset.columns.every((c, j) => c.kind !== 'numeric' || typeof r[j] === 'number')).length;
  return (
    <StudioPage
      trail={[{ href: '/studio/datasets', label: 'Datasets' }]}
      title={dataset.name}
      lead={
        <>
          Dataset {dataset.number} · {dataset.originalFilename} · {count(dataset.rowCount)} rows · {numeric.length} numeric and {dataset.columns.length - numeric.length} text column{dataset.columns.length - numeric.length === 1 ? '' : 's'} ·{' '}
          {complete === dataset.rowCount ? 'no gaps' : `${count(dataset.rowCount - complete)} rows have a gap in some numeric column`}
        </>
      }
      actions={<DeleteDatasetButton datasetId={dataset.id} name={dataset.name} fits={fits.length} />}
    >
      <Section title="Columns" id="columns" lead="What the upload found in each column. Text columns are kept but cannot be features.">
        <ColumnTable columns={dataset.columns} rows={dataset.rowCount} />
      </Section>
      <Section title="First rows" id="preview" lead={`Rows 2–${Math.min(21, dataset.rowCount + 1)} of the file, as parsed.`}>
        <PreviewTable columns={dataset.columns} rows={dataset.cells.slice(0, 20)} />
      </Section>
      <Section title="Feature settings" id="features" lead="How each feature is named and what range a published calculator will accept. The default range is the observed one widened by a tenth each side.">
        <FeatureSettingsForm datasetId={dataset.id} columns={dataset.columns} />
      </Section>
      <Section title="Fit mixtures" id="fit" lead="Every combination of component count and covariance structure is fitted and ranked by BIC.">
        <FitForm datasetId={dataset.id} columns={dataset.columns} defaults={FIT_DEFAULTS} maxComponentsAllowed={MAX_COMPONENTS} />
      </Section>
      {fits.length > 0 && (
        <Section title="Fits of this table" id="fits">
          <ul className="divide-y divide-ink/5">
            {fits.map((f) => {
              const p = f.params as { features?: string[]; minComponents?: number; maxComponents?: number; covariances?: string[] };
              return (
                <li key={f.id} className="flex flex-wrap items-center justify-between gap-3 py-2.5 text-sm">
                  <Link href={`/studio/fits/${f.id}`} className="font-bold text-moss-700 hover:underline">
                    Fit {f.number}
                  </Link>
                  <span className="flex-1 text-ink-soft">
                    {(p.features ?? []).join(', ')} · {p.minComponents}–{p.maxComponents} components · {(p.covariances ?? []).join(', ')}
                  </span>
                  <span className="text-ink-faint">{formatDateTime(f.createdAt)}</span>
                  <FitStatusPill status={f.status} />
                </li>
              );
            })}
          </ul>
        </Section>
      )}
    </StudioPage>
  );
}

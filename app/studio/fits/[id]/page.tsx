import { notFound } from 'next/navigation';
import type { Metadata } from 'next';
import { pageWorkspace } from '@/lib/auth/page';
import { AppError } from '@/lib/errors';
import { parseDecimalId } from '@/lib/http/ids';
import { findFit } from '@/lib/fitting/jobs';
import { queuePositionOf } from '@/lib/fitting/queue';
import { fitView } from '@/lib/fitting/views';
import { fitNumber, fitPageContext } from '@/lib/fitting/studio-queries';
import { formatCount } from '@/lib/format';
import { FitWorkbench } from '@/components/studio/FitWorkbench';
import { StudioPage } from '@/components/studio/StudioPage';

/** The tab title names the fit by its number in the workspace. */
export async function generateMetadata({ params }: { params: Promise<{ id: string }> }): Promise<Metadata> {
  const { id } = await params;
  const fitId = parseDecimalId(id);
  const actor = fitId === null ? null : await pageWorkspace('member', `/studio/fits/${id}`).catch(() => null);
  const number = actor && fitId !== null ? await fitNumber(actor.workspace.id, fitId) : null;
  return { title: number !== null ? `Fit ${number}` : 'Fit' };
}
export const dynamic = 'force-dynamic';

export default async function FitPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  // Decimal digits only: Number() would read "0x6" or "6e0" as 6.
  const fitId = parseDecimalId(id) ?? notFound();
  const actor = await pageWorkspace('member', `/studio/fits/${id}`);
  const fit = await findFit(actor.workspace.id, fitId).catch((e) => {
    if (e instanceof AppError && e.code === 'not_found') notFound();
    throw e;
  });
  const { dataset, kept } = await fitPageContext(actor.workspace.id, fit);
  const p = fit.params as { features?: string[]; minComponents?: number; maxComponents?: number; covariances?: string[]; restarts?: number; seed?: number; standardize?: boolean; rows?: number; dropped?: number };
  // `kept`: models already kept from this fit, so the page says so instead of inviting a duplicate.
  const view = JSON.parse(JSON.stringify(fitView(fit, await queuePositionOf(fit))));
  return (
    <StudioPage
      trail={[{ href: '/studio/datasets', label: 'Datasets' }, ...(dataset ? [{ href: `/studio/datasets/${dataset.id}`, label: dataset.name }] : [])]}
      title={`Fit ${fit.number}`}
      lead={
        <>
          {(p.features ?? []).join(', ')} · {p.minComponents}–{p.maxComponents} components · {(p.covariances ?? []).join(', ')} · {p.restarts} restart{p.restarts === 1 ? '' : 's'} · seed {p.seed} · {p.standardize ? 'standardised' : 'raw units'} · {formatCount(p.rows)} rows{p.dropped ? ` (${formatCount(p.dropped)} with gaps left out)` : ''}
        </>
      }
    >
      <FitWorkbench initial={view} datasetName={dataset?.name ?? 'Model'} kept={kept} />
    </StudioPage>
  );
}

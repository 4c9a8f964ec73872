import type { Metadata } from 'next';
import { notFound } from 'next/navigation';
import { pageWorkspace } from '@/lib/auth/page';
import { AppError } from '@/lib/errors';
import { parseDecimalId } from '@/lib/http/ids';
import { calculatorDetail } from '@/lib/embeds/studio-queries';
import { insightReport } from '@/lib/insight/report';
import { CalculatorTabs } from '@/components/calculators/CalculatorTabs';
import { InsightPanel } from '@/components/calculators/InsightPanel';
import { StatusPill } from '@/components/calculators/StatusPill';
import { StudioPage } from '@/components/studio/StudioPage';

export const metadata: Metadata = { title: 'Calculator insight' };
export const dynamic = 'force-dynamic';

export default async function CalculatorInsightPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const embedId = parseDecimalId(id) ?? notFound();
  const actor = await pageWorkspace('member', `/studio/calculators/${id}/insight`);
  try {
    const detail = await calculatorDetail(actor.workspace.id, embedId);
    const report = await insightReport({ user: actor.user, workspace: actor.workspace }, embedId, { days: 30 });
    return (
      <StudioPage trail={[{ href: '/studio/calculators', label: 'Calculators' }]} title={detail.embed.title} lead={<StatusPill status={detail.embed.status} />}>
        <CalculatorTabs embedId={embedId} current="insight" />
        <InsightPanel embedId={embedId} initial={report} />
      </StudioPage>
    );
  } catch (e) {
    if (e instanceof AppError && e.code === 'not_found') notFound();
    throw e;
  }
}

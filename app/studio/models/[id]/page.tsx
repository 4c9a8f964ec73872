import Link from 'next/link';
import { notFound } from 'next/navigation';
import type { Metadata } from 'next';
import { pageWorkspace } from '@/lib/auth/page';
import { AppError } from '@/lib/errors';
import { parseDecimalId } from '@/lib/http/ids';
import { findModel } from '@/lib/fitting/models';
import { modelPageContext } from '@/lib/fitting/studio-queries';
import { ModelEditor } from '@/components/studio/ModelEditor';
import { ReviewPanel } from '@/components/studio/ReviewPanel';
import { Section, StudioPage } from '@/components/studio/StudioPage';
import { formatCount, formatFixed } from '@/lib/format';

export const metadata: Metadata = { title: 'Model' };
export const dynamic = 'force-dynamic';

interface EngineModelShape {
  structure: string;
  weights: number[];
  means: number[][];
  bic: number;
  features: { name: string; unit: string | null }[];
  training: { rows: number };
  ranking?: { rank: number | null; components: number; covariance: string }[];
}

export default async function ModelPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  // Decimal digits only: Number() would read "0x6" or "6e0" as 6.
  const modelId = parseDecimalId(id) ?? notFound();
  const actor = await pageWorkspace('member', `/studio/models/${id}`);
  const model = await findModel(actor.workspace.id, modelId).catch((e) => {
    if (e instanceof AppError && e.code === 'not_found') notFound();
    throw e;
  });
  const engine = model.model as unknown as EngineModelShape;
  const { dataset, calculators, fit } = await modelPageContext(actor.workspace.id, model);
  const live = calculators.filter((c) => c.status !== 'retired');
  const rank = engine.ranking?.find((r) => r.components === engine.weights.length && r.covariance === engine.structure)?.rank;
  return (
    <StudioPage
      trail={[{ href: '/studio/models', label: 'Models' }, ...(dataset ? [{ href: `/studio/datasets/${dataset.id}`, label: dataset.name }] : [])]}
      title={model.name}
      lead={
        <>
          {engine.weights.length} clusters · {engine.structure} covariance · {engine.features.length} features · fitted on {formatCount(engine.training.rows)} rows · BIC {formatFixed(engine.bic, 1)}
          {rank ? ` (rank ${rank})` : ''}
          {fit ? (
            <>
              {' · '}
              <Link href={`/studio/fits/${fit.id}`} className="font-bold text-moss-700 hover:underline">
                fit {fit.number}
              </Link>
            </>
          ) : null}
        </>
      }
      actions={
        <div className="flex flex-wrap items-center gap-3">
          <a className="pw-button-quiet" href={`/api/models/${model.id}/download`} download>
            Download model JSON
          </a>
          <Link className="pw-button" href={`/studio/calculators?model=${model.id}#publish`}>
            {live.length ? 'Publish as another calculator' : 'Publish as a calculator'}
          </Link>
        </div>
      }
    >
      {live.length > 0 && (
        <p className="-mt-4 text-sm text-ink-soft" data-testid="published-as">
          Published as{' '}
          {live.map((c, i) => (
            <span key={c.id}>
              {i > 0 ? ', ' : ''}
              <Link href={`/studio/calculators/${c.id}`} className="font-bold text-moss-700 hover:underline">
                {c.title}
              </Link>
            </span>
          ))}
          . A calculator keeps the version it was published with: after changing names or fields here, publish a new version from its page.
        </p>
      )}
      {model.selectionNote && (
        <Section title="Why this candidate" id="note">
          <p className="text-ink-soft">{model.selectionNote}</p>
        </Section>
      )}
      <Section title="Name the clusters" id="naming" lead="Look at the means below and at the scatter, then give each cluster a name people will recognise.">
        <ModelEditor modelId={model.id} name={model.name} clusters={model.clusters} fields={model.fields} caution={model.caution} means={engine.means} weights={engine.weights} />
      </Section>
      {dataset ? (
        <Section title="The clusters in the data" id="review">
          <ReviewPanel
            baseUrl={`/api/models/${model.id}/review`}
            labels={model.clusters.map((c) => c.label)}
            colors={model.clusters.map((c) => c.color)}
            features={model.fields.map((f) => ({ name: f.feature, displayName: f.label, unit: f.unit }))}
          />
        </Section>
      ) : (
        <Section title="The clusters in the data" id="review">
          <p className="text-sm text-ink-soft">The dataset this model was fitted to has been deleted; the model itself is complete and can still be published.</p>
        </Section>
      )}
    </StudioPage>
  );
}

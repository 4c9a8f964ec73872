import type { Metadata } from 'next';
import Link from 'next/link';
import { notFound } from 'next/navigation';
import { pageWorkspace } from '@/lib/auth/page';
import { AppError } from '@/lib/errors';
import { parseDecimalId } from '@/lib/http/ids';
import { comparableVersions, compareCalculatorVersions, type ComparisonResult } from '@/lib/embeds/version-compare-queries';
import { formatCount, formatPercent } from '@/lib/format';
import { VersionComparisonHeatMap } from '@/components/calculators/VersionComparisonHeatMap';
import { VersionComparisonPicker } from '@/components/calculators/VersionComparisonPicker';
import { VersionComparisonServe } from '@/components/calculators/VersionComparisonServe';
import { UnmatchedGroups, VersionComparisonTable } from '@/components/calculators/VersionComparisonTable';
import { ErrorNote, Section, StudioPage } from '@/components/studio/StudioPage';
import { CalculatorTabs } from '@/components/calculators/CalculatorTabs';

export const metadata: Metadata = { title: 'Compare versions' };
export const dynamic = 'force-dynamic';

type Query = { from?: string | string[]; to?: string | string[] };

/** A version id from the query: absent → undefined (use the default), anything but decimal digits → 404. */
function queryId(raw: string | string[] | undefined): number | undefined {
  if (raw === undefined) return undefined;
  return parseDecimalId(raw) ?? notFound();
}

export default async function CompareVersionsPage({ params, searchParams }: { params: Promise<{ id: string }>; searchParams: Promise<Query> }) {
  const { id } = await params;
  const embedId = parseDecimalId(id) ?? notFound();
  const actor = await pageWorkspace('member', `/studio/calculators/${id}/compare`);
  const query = await searchParams;
  const wantedFrom = queryId(query.from);
  const wantedTo = queryId(query.to);

  let picker: Awaited<ReturnType<typeof comparableVersions>>;
  try {
    picker = await comparableVersions(actor.workspace.id, embedId);
  } catch (e) {
    if (e instanceof AppError && e.code === 'not_found') notFound();
    throw e;
  }
  const { embed, versions, defaults } = picker;
  const trail = [
    { href: '/studio/calculators', label: 'Calculators' },
    { href: `/studio/calculators/${embed.id}`, label: embed.title },
  ];
  const fromId = wantedFrom ?? defaults.from;
  const toId = wantedTo ?? defaults.to;
  if (versions.length < 2 || fromId === null || toId === null) {
    return (
      <StudioPage trail={trail} title="Compare versions">
        <CalculatorTabs embedId={embed.id} current="compare" />
        <Section title="Nothing to compare yet">
          <p className="text-ink-soft">
            This calculator has one version. Publish a new version from the <Link className="font-bold text-moss-700 underline" href={`/studio/calculators/${embed.id}#versions`}>calculator&rsquo;s page</Link> (it need not be served), then compare the two here.
          </p>
        </Section>
      </StudioPage>
    );
  }

  let result: ComparisonResult | null = null;
  let problem: AppError | null = null;
  try {
    result = await compareCalculatorVersions(actor.workspace.id, embedId, fromId, toId);
  } catch (e) {
    if (!(e instanceof AppError)) throw e;
    if (e.code === 'not_found' && !e.issues.length) notFound();
    problem = e;
  }
  const numberOf = new Map(versions.map((v) => [v.id, v.number]));
  const served = embed.activeVersionId;
  const servedNumber = served !== null ? (numberOf.get(served) ?? null) : null;
  const picked = <VersionComparisonPicker embedId={embed.id} versions={versions} servedId={served} fromId={fromId} toId={toId} />;

  if (!result) {
    return (
      <StudioPage trail={trail} title="Compare versions">
        <CalculatorTabs embedId={embed.id} current="compare" />
        <Section title="Versions" id="pick">
          {picked}
        </Section>
        <ErrorNote message={problem?.message ?? 'These versions cannot be compared.'} />
      </StudioPage>
    );
  }

  const { comparison, dataset, datasetReason } = result;
  const { from, to, rows } = comparison;
  const word = (v: { id: number; number: number }) => `v${v.number}${v.id === served ? ' (served)' : ''}`;
  // The version a button offers to serve: the one compared against, unless it is already served.
  const target = to.id !== served ? to : from.id !== served ? from : null;
  const partnerOf = from.groups.map((g) => comparison.pairs.find((p) => p.from.index === g.index)?.to.index ?? null);
  const stayed = rows ? rows.count - rows.changed : 0;

  return (
    <StudioPage
      trail={trail}
      title={`Compare ${word(from)} with ${word(to)}`}
      lead="Each group of one version is paired with the most similar group of the other, so you can see what a switch would change before visitors do."
      actions={target && embed.status !== 'retired' ? <VersionComparisonServe embedId={embed.id} versionId={target.id} number={target.number} servedNumber={servedNumber} disabled={false} /> : undefined}
    >
      <CalculatorTabs embedId={embed.id} current="compare" />
      <Section title="Versions" id="pick">
        {picked}
      </Section>

      <Section
        title="Matched groups"
        id="matched"
        lead={`Groups are paired one to one so that the pairs' means are as close as possible in total. Distances are measured after putting every field on the scale of v${Math.min(from.number, to.number)}, the older version${comparison.standardisedBy.basis === 'range' ? ' (its fields’ ranges, as it was fitted without standardising)' : ''}; 0 means the same centre. Shifts are v${to.number} minus v${from.number}, in each field's own unit.`}
      >
        <VersionComparisonTable comparison={comparison} />
        <div className="mt-4">
          <UnmatchedGroups comparison={comparison} />
        </div>
      </Section>

      <Section
        title="Where the data's rows land"
        id="rows"
        lead={dataset ? `The ${formatCount(dataset.rows)} rows of “${dataset.name}” scored by both versions, each row counted under its most likely group in each${dataset.dropped ? ` (${formatCount(dataset.dropped)} rows with a blank field left out)` : ''}.` : undefined}
      >
        {rows && dataset ? (
          <div className="space-y-4">
            <p className="text-lg text-ink" data-testid="compare-changed">
              {rows.changed === 0 ? (
                <>Every row keeps its group: its most likely group in v{to.number} is the partner of its group in v{from.number}.</>
              ) : (
                <>
                  <span className="font-bold">{formatPercent(rows.changedShare, 1)}</span> of the rows ({formatCount(rows.changed)} of {formatCount(rows.count)}) would change group: their most likely group in v{to.number} is not the partner of their group in v{from.number}. The other {formatCount(stayed)} stay with the matched group.
                </>
              )}
            </p>
            <VersionComparisonHeatMap fromNumber={from.number} toNumber={to.number} fromGroups={from.groups} toGroups={to.groups} counts={rows.counts} partnerOf={partnerOf} />
            <p className="text-sm text-ink-soft">Outlined cells are matched partners; rows elsewhere are the ones that change group.</p>
          </div>
        ) : (
          <p className="text-ink-soft">{datasetReason ?? 'No rows to compare on.'} The groups can still be matched by their means, above.</p>
        )}
        <p className="mt-4 rounded-lg bg-paper-deep px-4 py-3 text-sm text-ink" data-testid="compare-note">
          A change of best group describes the two models, not the people: the rows are the same people and the same measurements under both versions; only the way each version sorts them differs. Nobody has changed, and a different result for a visitor says nothing new about them.
        </p>
      </Section>
    </StudioPage>
  );
}

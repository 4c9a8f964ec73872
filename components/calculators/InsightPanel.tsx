'use client';

import { useState } from 'react';
import useSWR from 'swr';
import { DailyAnswersChart, FieldHistogramChart, GroupSharesChart } from '@/components/charts/InsightCharts';
import { ErrorNote, Section } from '@/components/studio/StudioPage';
import { formatCount, formatDate, formatPercent } from '@/lib/format';
import type { InsightFieldDrift, InsightReport } from '@/lib/insight/types';
import { dailyTotals, DRIFT_WORDS, driftText, fieldBinShares, groupDayPoints, versionStarts, windowSummary } from '@/lib/insight/view';
import { callApi, type ApiFailure } from './api';
import { InsightAlertsForm } from './InsightAlertsForm';

export const INSIGHT_WINDOWS = [7, 30, 90] as const;

export function insightUrl(embedId: number, days: number, versionId: number | null): string {
  return `/api/embeds/${embedId}/insight?days=${days}${versionId ? `&version=${versionId}` : ''}`;
}

async function fetchReport(url: string): Promise<InsightReport> {
  const res = await fetch(url);
  const body = await res.json().catch(() => null);
  if (!res.ok) throw new Error(body?.error?.message ?? `The request failed (${res.status}).`);
  return body as InsightReport;
}

const BAND_STYLE = { stable: 'bg-moss-100 text-moss-700', watch: 'bg-saffron-100 text-saffron-700', act: 'bg-clay-100 text-clay-700' } as const;

function DriftBadge({ drift, testId }: { drift: InsightFieldDrift; testId?: string }) {
  const style = drift.band ? BAND_STYLE[drift.band] : 'bg-paper-deep text-ink-soft';
  return (
    <span className={`inline-block rounded-full px-3 py-0.5 text-sm font-bold ${style}`} data-testid={testId}>
      {driftText(drift)}
    </span>
  );
}

function Figure({ label, value, note, testId }: { label: string; value: React.ReactNode; note?: string; testId?: string }) {
  return (
    <div className="rounded-lg bg-paper-deep px-4 py-3" data-testid={testId}>
      <p className="text-sm text-ink-soft">{label}</p>
      <p className="mt-1 text-2xl font-semibold text-ink">{value}</p>
      {note && <p className="mt-1 text-xs text-ink-soft">{note}</p>}
    </div>
  );
}

/**
 * What visitors got, day by day, and how their inputs compare with the training data.
 * Seeded with the server's report for the default window, then refetched (SWR) when the
 * window or version changes.
 */
export function InsightPanel({ embedId, initial }: { embedId: number; initial: InsightReport }) {
  const [days, setDays] = useState<number>(30);
  const [versionId, setVersionId] = useState<number | null>(null);
  const [switchError, setSwitchError] = useState<ApiFailure | null>(null);
  const [switching, setSwitching] = useState(false);
  const initialUrl = insightUrl(embedId, 30, null);
  const url = insightUrl(embedId, days, versionId);
  const { data, error, isLoading, mutate } = useSWR<InsightReport>(url, fetchReport, {
    fallbackData: url === initialUrl ? initial : undefined,
    keepPreviousData: true,
    revalidateOnFocus: false,
  });
  const report = data ?? initial;
  const totals = dailyTotals(report);
  const summary = windowSummary(report);
  const groups = groupDayPoints(report);
  const starts = versionId ? [] : versionStarts(report);
  const exportUrl = `/api/embeds/${embedId}/insight/export?days=${days}${versionId ? `&version=${versionId}` : ''}`;

  async function setEnabled(enabled: boolean) {
    setSwitching(true);
    setSwitchError(null);
    const result = await callApi(`/api/embeds/${embedId}/insight`, 'PUT', { enabled });
    setSwitching(false);
    if (!result.ok) return setSwitchError(result.error);
    await mutate();
  }

  return (
    <div className="space-y-8" data-testid="insight-panel">
      {report.demo && (
        <p className="rounded-lg border border-saffron-500/40 bg-saffron-100 px-4 py-3 text-saffron-700" data-testid="insight-demo-note">
          <span className="font-bold">Demo figures.</span> The daily counts before today were invented for the demo workspace so the charts have something to show; answers given now add to them.
        </p>
      )}
      {!report.enabled && (
        <div role="status" className="rounded-lg border border-ink/15 bg-paper-deep px-4 py-3">
          <p className="font-bold">Insight is off for this calculator.</p>
          <p className="text-sm text-ink-soft">Nothing is counted while it is off; the figures below stop on the day it was switched off.</p>
        </div>
      )}

      <div className="flex flex-wrap items-end gap-4">
        <div>
          <label htmlFor="insight-window" className="pw-label">Period</label>
          <select id="insight-window" className="pw-input" value={days} onChange={(e) => setDays(Number(e.target.value))}>
            {INSIGHT_WINDOWS.map((d) => (
              <option key={d} value={d}>Last {d} days</option>
            ))}
          </select>
        </div>
        <div>
          <label htmlFor="insight-version" className="pw-label">Version</label>
          <select id="insight-version" className="pw-input" value={versionId ?? ''} onChange={(e) => setVersionId(e.target.value ? Number(e.target.value) : null)}>
            <option value="">All versions</option>
            {report.versions.map((v) => (
              <option key={v.id} value={v.id}>
                v{v.number}
                {v.id === report.servedVersionId ? ' (served)' : ''}
              </option>
            ))}
          </select>
        </div>
        <a className="pw-button-quiet" href={exportUrl} download>
          Download daily counts (CSV)
        </a>
        <p className="text-sm text-ink-soft" aria-live="polite">
          {isLoading ? 'Loading…' : `${formatDate(`${report.from}T12:00:00Z`, 'UTC')} to ${formatDate(`${report.to}T12:00:00Z`, 'UTC')}, days in UTC`}
        </p>
      </div>
      {error && <ErrorNote message={`Could not load the figures: ${(error as Error).message}`} />}

      <div className="grid gap-4 sm:grid-cols-2 lg:grid-cols-5">
        <Figure label="Answers" value={formatCount(summary.answers)} note={`on ${summary.activeDays} of ${totals.length} days`} testId="insight-answers" />
        <Figure label="Flagged unusual" value={formatPercent(summary.unusualShare, 1)} note="fit no group well" />
        <Figure label="With blank fields" value={formatPercent(summary.blanksShare, 1)} />
        <Figure label="Drift, last 7 days" value={<DriftBadge drift={report.overall.last7} testId="insight-drift-7" />} note="largest of the fields" />
        <Figure label="Drift, last 30 days" value={<DriftBadge drift={report.overall.last30} testId="insight-drift-30" />} note="largest of the fields" />
      </div>

      <Section title="Answers per day" lead="Bars count the answers; the lines give the share flagged unusual and the share with a field left blank.">
        <div data-testid="insight-daily-chart">
          <DailyAnswersChart days={totals} />
        </div>
      </Section>

      <Section title="Best group over time" lead="Each answer counts once, for the group it resembles most. Dashed lines mark the day a new version started answering.">
        {groups.points.length ? (
          <div data-testid="insight-groups-chart">
            <GroupSharesChart points={groups.points} groups={groups.groups} versionStarts={starts} />
          </div>
        ) : (
          <p className="text-sm text-ink-soft">No answers in this period.</p>
        )}
      </Section>

      <Section
        title="Visitors’ values beside the training data"
        lead={`Each field on the bins fixed when the version was published. The training side is ${report.trainingSource === 'dataset' ? 'the rows the model was fitted on' : 'a sample drawn from the fitted model (the dataset was no longer in the workspace)'}.`}
      >
        <div className="grid gap-6 md:grid-cols-2" data-testid="insight-fields">
          {report.fields.map((f) => (
            <div key={f.feature} className="rounded-lg border border-ink/10 p-4" data-testid={`insight-field-${f.feature}`}>
              <div className="mb-2 flex flex-wrap items-baseline justify-between gap-2">
                <h3 className="font-bold">
                  {f.label}
                  {f.unit && <span className="font-normal text-ink-soft"> ({f.unit})</span>}
                </h3>
                <span className="flex flex-wrap gap-2 text-xs text-ink-soft">
                  7 days <DriftBadge drift={f.last7} /> 30 days <DriftBadge drift={f.last30} />
                </span>
              </div>
              <FieldHistogramChart bins={fieldBinShares(f)} label={`${f.label}: share of the training data and of visitors in each range of values`} />
              {f.blanks > 0 && <p className="mt-1 text-xs text-ink-soft">Left blank by {formatCount(f.blanks)} visitors in this period.</p>}
            </div>
          ))}
        </div>
        <div className="mt-6 space-y-2 text-sm text-ink-soft" data-testid="insight-drift-explained">
          <p>
            <span className="font-bold text-ink">How drift is measured.</span> The population stability index adds up, bin by bin, how the visitors’ share differs from the training data’s share, weighted by the log of their ratio; 0 means the same distribution. The overall figure is the largest of the fields’.
          </p>
          <p>
            Below 0.1: {DRIFT_WORDS.stable.word.toLowerCase()}. From 0.1 to 0.25: {DRIFT_WORDS.watch.word.toLowerCase()}. Above 0.25: {DRIFT_WORDS.act.word.toLowerCase()}. These bands are common practice in model monitoring; no published study stands behind them, so read them as a rule of thumb.
          </p>
          <p>Drift describes how the inputs people type compare with the data the model learnt from. It says nothing about any one visitor, and a group’s share describes similarity to groups in your data, not a judgement about anyone.</p>
        </div>
      </Section>

      <div className="grid gap-8 lg:grid-cols-2">
        <Section title="Weekly mail" id="insight-mail" lead="Only for you; each member chooses their own.">
          <InsightAlertsForm key={`${report.alerts.subscribed}-${report.alerts.driftThreshold}-${report.alerts.unusualShare}`} embedId={embedId} initial={report.alerts} onSaved={() => mutate()} />
        </Section>
        <Section title="Privacy" id="insight-privacy">
          <div className="space-y-3 text-sm text-ink-soft">
            <p>
              Partwise keeps no visitor’s values and no address for insight. Each answer only adds one to a handful of daily counters: its best group, whether it was unusual or had blanks, and which range each value fell in.
            </p>
            <p>Daily counts are kept {report.retentionMonths} months and then deleted.</p>
            <div className="flex flex-wrap items-center gap-3">
              {report.enabled ? (
                <button type="button" className="pw-button-quiet" disabled={switching} onClick={() => setEnabled(false)}>
                  Switch insight off
                </button>
              ) : (
                <button type="button" className="pw-button" disabled={switching} onClick={() => setEnabled(true)}>
                  Switch insight on
                </button>
              )}
              <span>{report.enabled ? 'Counting is on.' : 'Counting is off.'}</span>
            </div>
            {switchError && <ErrorNote message={switchError.message} />}
          </div>
        </Section>
      </div>
    </div>
  );
}

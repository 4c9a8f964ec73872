'use client';

import useSWR from 'swr';
import { useState } from 'react';
import { ClusterScatter } from '@/components/charts/ClusterScatter';
import { ClusterSizesChart } from '@/components/charts/ClusterSizesChart';
import { TraceChart } from '@/components/charts/TraceChart';
import type { Review } from '@/lib/fitting/review';
import { ClusterStatsTable } from './ClusterStatsTable';
import { fetcher } from './client-api';
import { formatCount, formatPercent, formatSmall } from '@/lib/format';

export interface FeatureTitle {
  name: string;
  displayName: string;
  unit: string;
}

const axisTitle = (f: FeatureTitle) => (f.unit ? `${f.displayName} (${f.unit})` : f.displayName);

/** Scatter with ellipses, sizes, certainty, trace and the per-cluster table of one fitted model. */
export function ReviewPanel({ baseUrl, labels, colors, features }: { baseUrl: string; labels: string[]; colors: string[]; features: FeatureTitle[] }) {
  const [x, setX] = useState(0);
  const [y, setY] = useState(features.length > 1 ? 1 : 0);
  const sep = baseUrl.includes('?') ? '&' : '?';
  const { data, error, isLoading } = useSWR<{ review: Review; trace: number[] }>(`${baseUrl}${sep}x=${x}&y=${y}`, fetcher, { keepPreviousData: true, revalidateOnFocus: false });
  if (error) return <p className="text-sm text-clay-700">Could not load the review: {(error as Error).message}</p>;
  if (!data) return <p className="text-sm text-ink-soft">{isLoading ? 'Scoring the rows…' : ''}</p>;
  const r = data.review;
  return (
    <div className="space-y-8">
      <div className="grid gap-4 sm:grid-cols-3">
        <Stat label="Rows scored" value={formatCount(r.rows)} hint={r.dropped ? `${formatCount(r.dropped)} left out for gaps` : 'none left out'} />
        <Stat label="Average certainty" value={formatPercent(r.meanMaxProbability)} hint="mean of each row's largest membership probability" testId="certainty" />
        <Stat label="Ambiguity (entropy)" value={formatSmall(r.normalizedEntropy, 2)} hint="0 = every row clear-cut, 1 = no idea" />
      </div>
      <div>
        <div className="mb-3 flex flex-wrap items-end gap-4">
          <h3 className="mr-auto text-lg font-semibold">Clusters in two features</h3>
          <AxisPicker label="Across" value={x} onChange={setX} features={features} />
          <AxisPicker label="Up" value={y} onChange={setY} features={features} />
        </div>
        <div data-testid="cluster-scatter" className="min-h-[400px]">
          <ClusterScatter data={r} labels={labels} colors={colors} xTitle={axisTitle(features[r.axes.x])} yTitle={axisTitle(features[r.axes.y])} />
        </div>
        <p className="mt-1 text-xs text-ink-faint">Solid rings: 1 sigma; dashed: 2 sigma. Faded points are rows the model is unsure about. {r.points.length < r.rows ? `Showing an even sample of ${formatCount(r.points.length)} of ${formatCount(r.rows)} rows.` : ''}</p>
      </div>
      <div className="grid gap-8 md:grid-cols-2">
        <div>
          <h3 className="mb-2 text-lg font-semibold">Cluster sizes</h3>
          <ClusterSizesChart clusters={r.clusters} labels={labels} colors={colors} />
        </div>
        <div>
          <h3 className="mb-2 text-lg font-semibold">Log-likelihood by iteration</h3>
          {data.trace.length ? <TraceChart trace={data.trace} /> : <p className="text-sm text-ink-soft">No trace stored.</p>}
        </div>
      </div>
      <div>
        <h3 className="mb-2 text-lg font-semibold">Means and standard deviations</h3>
        <ClusterStatsTable clusters={r.clusters} labels={labels} colors={colors} features={features.map((f) => ({ name: f.displayName, unit: f.unit }))} />
      </div>
    </div>
  );
}

function Stat({ label, value, hint, testId }: { label: string; value: string; hint: string; testId?: string }) {
  return (
    <div className="rounded-lg bg-paper px-4 py-3">
      <p className="text-xs font-bold uppercase tracking-wide text-ink-faint">{label}</p>
      <p className="font-display text-2xl font-semibold tabular-nums" data-testid={testId}>
        {value}
      </p>
      <p className="text-xs text-ink-soft">{hint}</p>
    </div>
  );
}

function AxisPicker({ label, value, onChange, features }: { label: string; value: number; onChange: (v: number) => void; features: FeatureTitle[] }) {
  return (
    <label className="text-sm">
      <span className="pw-label">{label}</span>
      <select className="pw-input py-1.5 text-sm" value={value} onChange={(e) => onChange(Number(e.target.value))}>
        {features.map((f, i) => (
          <option key={f.name} value={i}>
            {f.displayName}
          </option>
        ))}
      </select>
    </label>
  );
}

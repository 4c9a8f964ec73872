'use client';

import { VegaChart } from '@/components/charts/VegaChart';

/** Daily answers over the last 30 days (UTC), summed from the hour buckets. */
export function UsageChart({ daily }: { daily: { day: string; answers: number }[] }) {
  const total = daily.reduce((s, d) => s + d.answers, 0);
  const peak = Math.max(0, ...daily.map((d) => d.answers));
  const spec = {
    width: 'container',
    height: 180,
    data: { values: daily },
    mark: { type: 'bar', color: '#3a8a74', cornerRadiusTopLeft: 2, cornerRadiusTopRight: 2 },
    encoding: {
      x: { field: 'day', type: 'temporal', timeUnit: 'utcyearmonthdate', title: null, axis: { format: '%d %b', labelAngle: 0, tickCount: 8 } },
      // Whole answers only; an empty month still gets a readable 0–5 axis.
      y: { field: 'answers', type: 'quantitative', title: 'Answers per day', axis: { format: ',d', tickMinStep: 1 }, scale: peak === 0 ? { domain: [0, 5] } : { domainMin: 0, nice: true } },
      tooltip: [
        { field: 'day', type: 'temporal', timeUnit: 'utcyearmonthdate', title: 'Day (UTC)' },
        { field: 'answers', type: 'quantitative', title: 'Answers', format: ',' },
      ],
    },
  };
  return (
    <div data-testid="usage-chart">
      <VegaChart spec={spec} label={`Answers per day over the last 30 days, ${total} in all`} className="w-full" />
      {total === 0 ? <p className="mt-2 text-sm text-ink-faint">No answers in the last 30 days.</p> : null}
    </div>
  );
}

'use client';

import { VegaChart } from './VegaChart';

/** One day's count of one group, ready for a stacked chart. */
export interface GroupDayPoint {
  day: string;
  group: string;
  answers: number;
}

const DAY_AXIS = { field: 'day', type: 'temporal', timeUnit: 'utcyearmonthdate', title: null, axis: { format: '%d %b', labelAngle: 0, tickCount: 8 } } as const;

/**
 * The share of each group among the day's answers, stacked to 100 %, in the groups' own
 * colours. A rule marks each day a different version started to be counted.
 */
export function GroupSharesChart({ points, groups, versionStarts }: { points: GroupDayPoint[]; groups: { label: string; color: string }[]; versionStarts: { day: string; label: string }[] }) {
  const spec = {
    width: 'container',
    height: 220,
    layer: [
      {
        data: { values: points },
        mark: { type: 'area', interpolate: 'step-after', opacity: 0.9 },
        encoding: {
          x: DAY_AXIS,
          y: { aggregate: 'sum', field: 'answers', type: 'quantitative', stack: 'normalize', title: 'Share of the day’s answers', axis: { format: '.0%' } },
          color: { field: 'group', type: 'nominal', title: 'Best group', scale: { domain: groups.map((g) => g.label), range: groups.map((g) => g.color) }, legend: { orient: 'bottom', columns: 3 } },
          order: { field: 'group' },
          tooltip: [
            { field: 'day', type: 'temporal', timeUnit: 'utcyearmonthdate', title: 'Day (UTC)' },
            { field: 'group', type: 'nominal', title: 'Best group' },
            { aggregate: 'sum', field: 'answers', type: 'quantitative', title: 'Answers', format: ',' },
          ],
        },
      },
      ...(versionStarts.length
        ? [
            {
              data: { values: versionStarts },
              mark: { type: 'rule', color: '#1d2330', strokeDash: [4, 3], strokeWidth: 1.5 },
              encoding: { x: { field: 'day', type: 'temporal', timeUnit: 'utcyearmonthdate' }, tooltip: [{ field: 'label', type: 'nominal', title: 'Version' }] },
            },
          ]
        : []),
    ],
  };
  return <VegaChart spec={spec} label="Share of each best group among the answers of each day, stacked to 100 percent" className="w-full" />;
}

/** Answers per day as bars, with the share flagged unusual and the share with blank fields as lines on a second axis. */
export function DailyAnswersChart({ days }: { days: { day: string; answers: number; unusualShare: number | null; blanksShare: number | null }[] }) {
  const peak = Math.max(0, ...days.map((d) => d.answers));
  const shares = days.flatMap((d) => [
    ...(d.unusualShare === null ? [] : [{ day: d.day, measure: 'Unusual', share: d.unusualShare }]),
    ...(d.blanksShare === null ? [] : [{ day: d.day, measure: 'With blank fields', share: d.blanksShare }]),
  ]);
  const spec = {
    width: 'container',
    height: 200,
    layer: [
      {
        data: { values: days },
        mark: { type: 'bar', color: '#7fb8a6', cornerRadiusTopLeft: 2, cornerRadiusTopRight: 2 },
        encoding: {
          x: DAY_AXIS,
          y: { field: 'answers', type: 'quantitative', title: 'Answers per day', axis: { format: ',d', tickMinStep: 1 }, scale: peak === 0 ? { domain: [0, 5] } : { domainMin: 0, nice: true } },
          tooltip: [
            { field: 'day', type: 'temporal', timeUnit: 'utcyearmonthdate', title: 'Day (UTC)' },
            { field: 'answers', type: 'quantitative', title: 'Answers', format: ',' },
          ],
        },
      },
      {
        data: { values: shares },
        mark: { type: 'line', point: { size: 18 }, strokeWidth: 2 },
        encoding: {
          x: DAY_AXIS,
          y: { field: 'share', type: 'quantitative', title: 'Share of answers', axis: { format: '.0%', orient: 'right' }, scale: { domain: [0, 1] } },
          color: { field: 'measure', type: 'nominal', title: null, scale: { domain: ['Unusual', 'With blank fields'], range: ['#b8432f', '#8a620c'] }, legend: { orient: 'bottom' } },
          strokeDash: { field: 'measure', type: 'nominal', scale: { domain: ['Unusual', 'With blank fields'], range: [[1, 0], [5, 3]] }, legend: null },
          tooltip: [
            { field: 'day', type: 'temporal', timeUnit: 'utcyearmonthdate', title: 'Day (UTC)' },
            { field: 'measure', type: 'nominal', title: 'Measure' },
            { field: 'share', type: 'quantitative', title: 'Share', format: '.1%' },
          ],
        },
      },
    ],
    resolve: { scale: { y: 'independent' } },
  };
  return <VegaChart spec={spec} label="Answers per day, with the share flagged unusual and the share with blank fields" className="w-full" />;
}

/** One bin of a field: its words and the two shares on it. */
export interface BinShare {
  bin: string;
  order: number;
  source: 'Training data' | 'Visitors';
  share: number;
}

/** The training data's and the visitors' distribution of a field, overlaid on the same bins. */
export function FieldHistogramChart({ bins, label }: { bins: BinShare[]; label: string }) {
  const spec = {
    width: 'container',
    height: 150,
    data: { values: bins },
    // Visitors drawn as outlined, see-through bars over the grey training bars, so both stay readable where they overlap.
    mark: { type: 'bar', binSpacing: 1, strokeWidth: 1.5 },
    encoding: {
      x: { field: 'bin', type: 'ordinal', sort: { field: 'order' }, title: null, axis: { labelAngle: -40, labelLimit: 90, labelFontSize: 10 } },
      y: { field: 'share', type: 'quantitative', stack: null, title: 'Share', axis: { format: '.0%', tickCount: 4 } },
      color: { field: 'source', type: 'nominal', title: null, scale: { domain: ['Training data', 'Visitors'], range: ['#8a91a0', '#2f6f5e'] }, legend: { orient: 'top' } },
      fillOpacity: { field: 'source', type: 'nominal', scale: { domain: ['Training data', 'Visitors'], range: [0.55, 0.3] }, legend: null },
      stroke: { field: 'source', type: 'nominal', scale: { domain: ['Training data', 'Visitors'], range: ['transparent', '#245649'] }, legend: null },
      tooltip: [
        { field: 'bin', type: 'ordinal', title: 'Values' },
        { field: 'source', type: 'nominal', title: 'Who' },
        { field: 'share', type: 'quantitative', title: 'Share', format: '.1%' },
      ],
    },
  };
  return <VegaChart spec={spec} label={label} className="w-full" />;
}

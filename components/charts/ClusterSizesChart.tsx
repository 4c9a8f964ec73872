'use client';

import { VegaChart } from './VegaChart';

/** Mixing weight and soft count (sum of membership probabilities) per cluster. */
export function ClusterSizesChart({ clusters, labels, colors }: { clusters: { weight: number; softCount: number; hardCount: number }[]; labels: string[]; colors: string[] }) {
  const values = clusters.map((c, i) => ({ cluster: labels[i], weight: c.weight, soft: c.softCount, hard: c.hardCount }));
  const spec = {
    data: { values },
    width: 'container',
    height: Math.max(90, 30 * clusters.length),
    mark: { type: 'bar', cornerRadiusEnd: 3 },
    encoding: {
      y: { field: 'cluster', type: 'nominal', title: null, sort: null },
      x: { field: 'weight', type: 'quantitative', title: 'Share of data (mixing weight)', axis: { format: '.0%' } },
      color: { field: 'cluster', type: 'nominal', scale: { domain: labels, range: colors }, legend: null },
      tooltip: [
        { field: 'cluster', title: 'Cluster' },
        { field: 'weight', title: 'Share of data', format: '.1%' },
        { field: 'soft', title: 'Soft count', format: ',.1f' },
        { field: 'hard', title: 'Rows most likely here', format: ',d' },
      ],
    },
  };
  return <VegaChart spec={spec} label="Share of the data (mixing weight) of each cluster" className="w-full" />;
}

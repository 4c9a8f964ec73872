'use client';

import { VegaChart } from './VegaChart';

export interface ScatterData {
  points: { x: number; y: number; cluster: number; p: number }[];
  ellipses: { cluster: number; sigma: 1 | 2; path: [number, number][] }[];
}

/** Rows of two features coloured by their most likely cluster, with each component's 1- and 2-sigma ellipses. */
export function ClusterScatter({ data, labels, colors, xTitle, yTitle }: { data: ScatterData; labels: string[]; colors: string[]; xTitle: string; yTitle: string }) {
  const points = data.points.map((p) => ({ x: p.x, y: p.y, cluster: labels[p.cluster], certainty: p.p }));
  const lines = data.ellipses.flatMap((e) => e.path.map(([x, y], order) => ({ x, y, order, cluster: labels[e.cluster], ring: `${e.cluster}-${e.sigma}`, sigma: e.sigma === 1 ? '1 sigma' : '2 sigma' })));
  const color = { field: 'cluster', type: 'nominal', title: 'Most likely cluster', scale: { domain: labels, range: colors } };
  const spec = {
    width: 'container',
    height: 380,
    layer: [
      {
        data: { values: points },
        mark: { type: 'circle', size: 22 },
        encoding: {
          x: { field: 'x', type: 'quantitative', title: xTitle, scale: { zero: false, nice: true } },
          y: { field: 'y', type: 'quantitative', title: yTitle, scale: { zero: false, nice: true } },
          color,
          opacity: { field: 'certainty', type: 'quantitative', scale: { domain: [0.3, 1], range: [0.25, 0.8] }, legend: null },
          tooltip: [
            { field: 'cluster', title: 'Cluster' },
            { field: 'certainty', title: 'Probability', format: '.0%' },
            { field: 'x', title: xTitle },
            { field: 'y', title: yTitle },
          ],
        },
      },
      {
        data: { values: lines },
        mark: { type: 'line', strokeWidth: 2, interpolate: 'linear' },
        encoding: {
          x: { field: 'x', type: 'quantitative' },
          y: { field: 'y', type: 'quantitative' },
          detail: { field: 'ring' },
          order: { field: 'order', type: 'quantitative' },
          color: { field: 'cluster', type: 'nominal', scale: { domain: labels, range: colors } },
          strokeDash: { field: 'sigma', type: 'nominal', title: 'Ellipse', scale: { domain: ['1 sigma', '2 sigma'], range: [[1, 0], [5, 4]] } },
        },
      },
    ],
  };
  return <VegaChart spec={spec} label={`Scatter of ${yTitle} against ${xTitle}, coloured by most likely cluster, with 1- and 2-sigma ellipses`} className="w-full" />;
}

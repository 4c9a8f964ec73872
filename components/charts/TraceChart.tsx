'use client';

import { VegaChart } from './VegaChart';

/** Mean log-likelihood per row at each EM iteration of the winning restart. */
export function TraceChart({ trace }: { trace: number[] }) {
  const values = trace.map((v, i) => ({ iteration: i + 1, value: v }));
  const spec = {
    data: { values },
    width: 'container',
    height: 180,
    mark: { type: 'line', point: trace.length < 40, color: '#2f6f5e', strokeWidth: 2 },
    encoding: {
      x: { field: 'iteration', type: 'quantitative', title: 'Iteration', axis: { tickMinStep: 1, format: 'd' } },
      y: { field: 'value', type: 'quantitative', title: 'Mean log-likelihood per row', scale: { zero: false } },
      tooltip: [
        { field: 'iteration', title: 'Iteration' },
        { field: 'value', title: 'Mean log-likelihood', format: '.5f' },
      ],
    },
  };
  return <VegaChart spec={spec} label="Log-likelihood trace of the EM iterations" className="w-full" />;
}

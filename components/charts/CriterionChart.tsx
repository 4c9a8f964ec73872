'use client';

import { VegaChart } from './VegaChart';

export interface CriterionPoint {
  components: number;
  covariance: string;
  bic: number | null;
  aic: number | null;
  index: number;
}

/** BIC and AIC against the number of components, one line per covariance structure; the chosen candidate ringed. */
export function CriterionChart({ candidates, chosen }: { candidates: CriterionPoint[]; chosen: number }) {
  const values = candidates.flatMap((c) =>
    (['bic', 'aic'] as const).flatMap((criterion) =>
      c[criterion] === null ? [] : [{ criterion: criterion.toUpperCase(), components: c.components, structure: c.covariance, value: c[criterion], chosen: c.index === chosen }],
    ),
  );
  const palette: Record<string, string> = { full: '#2f6f5e', diagonal: '#b7791f', spherical: '#4462c9', tied: '#b34a7d' };
  const present = Object.keys(palette).filter((s) => candidates.some((c) => c.covariance === s));
  const spec = {
    data: { values },
    facet: { column: { field: 'criterion', type: 'nominal', title: null, sort: ['BIC', 'AIC'], header: { labelFontSize: 13, labelFontWeight: 700, labelColor: '#1d2330' } } },
    resolve: { scale: { y: 'independent' } },
    spec: {
      width: 300,
      height: 220,
      layer: [
        {
          mark: { type: 'line', point: { filled: true, size: 40 }, strokeWidth: 2 },
          encoding: {
            x: { field: 'components', type: 'quantitative', title: 'Components', axis: { tickMinStep: 1, format: 'd' } },
            y: { field: 'value', type: 'quantitative', title: 'Lower is better', scale: { zero: false } },
            color: { field: 'structure', type: 'nominal', title: 'Covariance', scale: { domain: present, range: present.map((s) => palette[s]) } },
            tooltip: [
              { field: 'structure', title: 'Covariance' },
              { field: 'components', title: 'Components' },
              { field: 'value', title: 'Value', format: ',.1f' },
            ],
          },
        },
        {
          transform: [{ filter: 'datum.chosen' }],
          mark: { type: 'point', size: 260, strokeWidth: 2.5, color: '#1d2330', filled: false },
          encoding: { x: { field: 'components', type: 'quantitative' }, y: { field: 'value', type: 'quantitative' } },
        },
      ],
    },
  };
  return <VegaChart spec={spec} label="BIC and AIC against the number of components for each covariance structure" />;
}

'use client';

import { VegaChart } from './VegaChart';

export interface CriterionPoint {
  components: number;
  covariance: string;
  bic: number | null;
  aic: number | null;
  index: number;
}

/** BIC and AIC (each panel's axis titled by its measure; lower is better) against the number of components, one line per covariance structure; the chosen candidate ringed. */
export function CriterionChart({ candidates, chosen }: { candidates: CriterionPoint[]; chosen: number }) {
  // Wide rows (one per candidate, a column per measure) so each panel's y axis is titled by its measure.
  const values = candidates.map((c) => ({ BIC: c.bic, AIC: c.aic, components: c.components, structure: c.covariance, chosen: c.index === chosen }));
  const palette: Record<string, string> = { full: '#2f6f5e', diagonal: '#b7791f', spherical: '#4462c9', tied: '#b34a7d' };
  const present = Object.keys(palette).filter((s) => candidates.some((c) => c.covariance === s));
  const y = { field: { repeat: 'column' }, type: 'quantitative', scale: { zero: false }, axis: { format: ',.0f' } };
  const spec = {
    data: { values },
    repeat: { column: ['BIC', 'AIC'] },
    resolve: { scale: { y: 'independent' } },
    spec: {
      width: 300,
      height: 220,
      layer: [
        {
          mark: { type: 'line', point: { filled: true, size: 40 }, strokeWidth: 2 },
          encoding: {
            x: { field: 'components', type: 'quantitative', title: 'Components', axis: { tickMinStep: 1, format: 'd' } },
            y,
            color: { field: 'structure', type: 'nominal', title: 'Covariance', scale: { domain: present, range: present.map((s) => palette[s]) } },
            tooltip: [
              { field: 'structure', title: 'Covariance' },
              { field: 'components', title: 'Components' },
              { field: { repeat: 'column' }, type: 'quantitative', format: ',.1f' },
            ],
          },
        },
        {
          transform: [{ filter: 'datum.chosen' }],
          mark: { type: 'point', size: 260, strokeWidth: 2.5, color: '#1d2330', filled: false },
          encoding: { x: { field: 'components', type: 'quantitative' }, y },
        },
      ],
    },
  };
  return <VegaChart spec={spec} label="BIC and AIC against the number of components for each covariance structure" />;
}

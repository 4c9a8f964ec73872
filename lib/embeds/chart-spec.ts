import 'server-only';
import { compile, type TopLevelSpec } from 'vega-lite';

/**
 * The membership chart is written in vega-lite and compiled to a vega spec here, on
 * the server, so the calculator ships only vega's runtime (loaded when the first
 * answer arrives) and never the vega-lite compiler. Rows arrive in the dataset
 * `memberships` as { label, probability, text }, text being the percentage as the
 * calculator writes it elsewhere (formatProbability in lib/format.ts).
 */
export interface ChartCluster {
  label: string;
  color: string;
}

const cache = new Map<string, object>();

export function membershipChartSpec(clusters: ChartCluster[], theme: 'light' | 'dark'): object {
  const key = JSON.stringify([clusters, theme]);
  const hit = cache.get(key);
  if (hit) return hit;
  const text = theme === 'dark' ? '#e8e4dc' : '#1d2330';
  const soft = theme === 'dark' ? '#a9b0bf' : '#4a5366';
  const grid = theme === 'dark' ? '#39405a' : '#e5dfd3';
  const spec: TopLevelSpec = {
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    description: 'Membership probability per group',
    data: { name: 'memberships' },
    width: 'container',
    height: { step: 34 },
    background: 'transparent',
    autosize: { type: 'fit-x', contains: 'padding' },
    layer: [
      {
        mark: { type: 'bar', cornerRadiusEnd: 4, height: { band: 0.72 } },
        encoding: {
          y: { field: 'label', type: 'nominal', sort: null, title: null, axis: { labelLimit: 140, labelFontSize: 13, labelColor: text, domain: false, ticks: false, labelPadding: 8 } },
          x: {
            field: 'probability',
            type: 'quantitative',
            scale: { domain: [0, 1] },
            title: null,
            axis: { format: '.0%', tickCount: 4, labelColor: soft, gridColor: grid, domain: false, ticks: false },
          },
          color: { field: 'label', type: 'nominal', scale: { domain: clusters.map((c) => c.label), range: clusters.map((c) => c.color) }, legend: null },
        },
      },
      {
        mark: { type: 'text', align: 'left', dx: 5, fontSize: 12, fontWeight: 'bold', color: text },
        encoding: {
          y: { field: 'label', type: 'nominal', sort: null },
          x: { field: 'probability', type: 'quantitative' },
          text: { field: 'text', type: 'nominal' },
        },
      },
    ],
    config: { view: { stroke: null }, font: 'system-ui, sans-serif' },
  };
  // Plain JSON: the spec is handed to a client component (vega-lite builds some objects
  // without a plain prototype, which React refuses to serialise).
  const compiled = JSON.parse(JSON.stringify(compile(spec).spec)) as object;
  cache.set(key, compiled);
  return compiled;
}

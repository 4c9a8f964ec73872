'use client';

import { VegaEmbed } from 'react-vega';
import type { VisualizationSpec } from 'vega-embed';
import { expressionInterpreter } from 'vega-interpreter';

/** Partwise's chart look: our fonts and ink colours, no export menu, SVG for crisp text. */
const CONFIG = {
  font: 'Atkinson Hyperlegible, system-ui, sans-serif',
  background: 'transparent',
  axis: { labelColor: '#4a5366', titleColor: '#1d2330', gridColor: '#e9e4da', domainColor: '#8a91a0', tickColor: '#8a91a0', labelFontSize: 11, titleFontSize: 12, titleFontWeight: 700 },
  legend: { labelColor: '#4a5366', titleColor: '#1d2330', labelFontSize: 11, titleFontSize: 12 },
  view: { stroke: null },
};

/** `onReady` runs once the chart is drawn (a page can then mark itself data-chart-ready for tests and screenshots). */
export function VegaChart({ spec, label, className, onReady }: { spec: Record<string, unknown>; label: string; className?: string; onReady?: () => void }) {
  const full = { $schema: 'https://vega.github.io/schema/vega-lite/v6.json', config: CONFIG, ...spec } as VisualizationSpec;
  return (
    <figure className={className} aria-label={label} role="img">
      {/* ast + interpreter: chart expressions run without eval, so the pages keep a CSP without 'unsafe-eval' */}
      <VegaEmbed spec={full} options={{ actions: false, renderer: 'svg', tooltip: true, ast: true, expr: expressionInterpreter }} className="w-full" onEmbed={onReady ? () => onReady() : undefined} />
    </figure>
  );
}

'use client';
import { useCallback, useEffect, useRef, useState } from 'react';
import { VegaChart } from '@/components/charts/VegaChart';
import { formatCount } from '@/lib/format';

interface Group {
  index: number;
  label: string;
}

/** Labels made unique within one version (two groups named alike would share one row of the chart). */
function uniqueNames(groups: Group[]): string[] {
  const seen = new Map<string, number>();
  return groups.map((g) => {
    const n = (seen.get(g.label) ?? 0) + 1;
    seen.set(g.label, n);
    return n === 1 ? g.label : `${g.label} (${n})`;
  });
}

/**
 * The cross table of best groups as a heat map: one row per group of the older side
 * (`from`), one column per group of `to`, each cell the number of rows whose best group is
 * that pair; the cells of matched partners are outlined. The same numbers follow as a
 * plain table for screen readers (the chart itself is an image to them).
 */
export function VersionComparisonHeatMap({ fromNumber, toNumber, fromGroups, toGroups, counts, partnerOf }: { fromNumber: number; toNumber: number; fromGroups: Group[]; toGroups: Group[]; counts: number[][]; partnerOf: (number | null)[] }) {
  const wrapper = useRef<HTMLDivElement>(null);
  const markReady = useCallback(() => wrapper.current?.setAttribute('data-chart-ready', 'true'), []);
  // On a phone the column names stand upright so they neither run into each other nor squeeze the grid.
  const [narrow, setNarrow] = useState(false);
  useEffect(() => {
    const query = window.matchMedia('(max-width: 640px)');
    setNarrow(query.matches);
    const change = () => setNarrow(query.matches);
    query.addEventListener('change', change);
    return () => query.removeEventListener('change', change);
  }, []);
  const fromNames = uniqueNames(fromGroups);
  const toNames = uniqueNames(toGroups);
  // Rows in the older side's order, columns in the order of their partners, so matched cells run down the diagonal;
  // groups without a partner come last.
  const partnered = partnerOf.filter((j): j is number => j !== null);
  const toOrder = [...partnered, ...toGroups.map((_, j) => j).filter((j) => !partnered.includes(j))];
  const fromOrder = [...fromGroups.keys()].sort((a, b) => Number(partnerOf[a] === null) - Number(partnerOf[b] === null));
  const max = Math.max(1, ...counts.flat());
  const values = counts.flatMap((row, i) =>
    row.map((count, j) => ({ from: fromNames[i], to: toNames[j], count, shown: formatCount(count), matched: partnerOf[i] === j, dark: count > max * 0.55 })),
  );
  const fromTitle = `Best group in v${fromNumber}`;
  const toTitle = `Best group in v${toNumber}`;
  const spec = {
    data: { values },
    width: 'container',
    height: Math.max(120, 44 * fromNames.length),
    encoding: {
      x: { field: 'to', type: 'nominal', title: toTitle, sort: toOrder.map((j) => toNames[j]), axis: narrow ? { orient: 'top', labelAngle: -90, labelAlign: 'left', labelBaseline: 'middle', labelLimit: 130, labelPadding: 4 } : { orient: 'top', labelAngle: 0, labelLimit: 140, labelPadding: 6 } },
      y: { field: 'from', type: 'nominal', title: fromTitle, sort: fromOrder.map((i) => fromNames[i]), axis: { labelLimit: narrow ? 90 : 160, labelPadding: 6 } },
    },
    layer: [
      {
        mark: { type: 'rect', cornerRadius: 3 },
        encoding: {
          color: { field: 'count', type: 'quantitative', title: 'Rows', scale: { domain: [0, max], range: ['#f6f2ea', '#245649'] }, legend: { orient: 'bottom', direction: 'horizontal', gradientLength: 160 } },
          stroke: { condition: { test: 'datum.matched', value: '#b7791f' }, value: null },
          strokeWidth: { condition: { test: 'datum.matched', value: 3 }, value: 0 },
          tooltip: [
            { field: 'from', title: fromTitle },
            { field: 'to', title: toTitle },
            { field: 'shown', title: 'Rows' },
          ],
        },
      },
      {
        mark: { type: 'text', fontSize: narrow ? 11 : 13, fontWeight: 700 },
        encoding: {
          text: { field: 'shown' },
          color: { condition: { test: 'datum.dark', value: '#ffffff' }, value: '#1d2330' },
        },
      },
    ],
  };
  return (
    <div ref={wrapper} data-testid="compare-heat-map">
      <VegaChart spec={spec} label={`Rows by their best group in v${fromNumber} (rows) and v${toNumber} (columns)`} className="w-full" onReady={markReady} />
      <table className="sr-only">
        <caption>Rows by best group: v{fromNumber} down, v{toNumber} across</caption>
        <thead>
          <tr>
            <th scope="col">v{fromNumber} \ v{toNumber}</th>
            {toOrder.map((j) => (
              <th key={toNames[j]} scope="col">{toNames[j]}</th>
            ))}
          </tr>
        </thead>
        <tbody>
          {fromOrder.map((i) => (
            <tr key={fromNames[i]}>
              <th scope="row">{fromNames[i]}</th>
              {toOrder.map((j) => (
                <td key={toNames[j]}>{formatCount(counts[i][j])}</td>
              ))}
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

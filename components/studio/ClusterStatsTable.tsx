import { formatCount, formatFixed, formatMeanSd, formatPercent } from '@/lib/format';

export interface StatsCluster {
  weight: number;
  softCount: number;
  hardCount: number;
  certainty: number | null;
  means: number[];
  sds: number[];
}

/** Per-cluster share of the data (mixing weight), sizes, certainty, and mean ± standard deviation of each feature in original units. */
export function ClusterStatsTable({ clusters, labels, colors, features }: { clusters: StatsCluster[]; labels: string[]; colors: string[]; features: { name: string; unit?: string }[] }) {
  return (
    <div className="overflow-x-auto">
      <table className="w-full text-left text-sm" aria-label="Cluster means and standard deviations">
        <thead className="border-b border-ink/10 text-ink-soft">
          <tr>
            <th className="py-2 pr-4 font-bold">Cluster</th>
            <th className="py-2 pr-4 text-right font-bold" title="The mixing weight: the share of the data this cluster describes">
              Share of data
            </th>
            <th className="py-2 pr-4 text-right font-bold" title="Sum of membership probabilities">
              Soft count
            </th>
            <th className="py-2 pr-4 text-right font-bold" title="Mean probability of the rows most likely in this cluster">
              Certainty
            </th>
            {features.map((f) => (
              <th key={f.name} className="py-2 pr-4 text-right font-bold">
                {f.name}
                {f.unit ? <span className="font-normal text-ink-faint"> ({f.unit})</span> : null}
              </th>
            ))}
          </tr>
        </thead>
        <tbody>
          {clusters.map((c, k) => (
            <tr key={k} className="border-b border-ink/5">
              <td className="py-2 pr-4">
                <span className="inline-flex items-center gap-2 font-bold">
                  <span className="inline-block h-3 w-3 rounded-full" style={{ background: colors[k] }} aria-hidden />
                  {labels[k]}
                </span>
              </td>
              <td className="py-2 pr-4 text-right tabular-nums">{formatPercent(c.weight, 1)}</td>
              <td className="py-2 pr-4 text-right tabular-nums">
                {formatFixed(c.softCount, 1)}
                <span className="block text-xs text-ink-faint">{formatCount(c.hardCount)} most likely</span>
              </td>
              <td className="py-2 pr-4 text-right tabular-nums">{formatPercent(c.certainty)}</td>
              {c.means.map((m, j) => (
                <td key={j} className="py-2 pr-4 text-right tabular-nums">
                  {formatMeanSd(m, c.sds[j])}
                </td>
              ))}
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

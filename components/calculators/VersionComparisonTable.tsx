import type { GroupRef, VersionComparison } from '@/lib/embeds/version-compare';
import { decimalsFor, formatFixed, formatNumber, formatPercent } from '@/lib/format';

/**
 * A shift with its sign, to the precision of the numbers it is the difference of (the
 * means are shown with three significant digits): 24.6 − 24.1 → "+0.5", 1,051 − 1,054 → "−3".
 */
function signed(shift: number, decimals: number): string {
  const text = formatFixed(shift, decimals);
  return shift > 0 && /[1-9]/.test(text) ? `+${text}` : text;
}

const meanDecimals = (a: number, b: number) => Math.min(decimalsFor(a, 3), decimalsFor(b, 3));

export function GroupName({ group }: { group: Pick<GroupRef, 'label' | 'color'> }) {
  return (
    <span className="inline-flex items-center gap-2">
      <span aria-hidden="true" className="inline-block h-3.5 w-3.5 shrink-0 rounded-sm ring-1 ring-ink/10" style={{ backgroundColor: group.color }} />
      <span className="font-bold">{group.label}</span>
    </span>
  );
}

/** The matched pairs: names, share of the data before and after, mean shifts in the fields' own units, and the distance. */
export function VersionComparisonTable({ comparison }: { comparison: VersionComparison }) {
  const { from, to, fields, pairs } = comparison;
  return (
    <div className="overflow-x-auto">
      <table className="w-full min-w-[44rem] text-left text-sm" data-testid="compare-pairs">
        <caption className="sr-only">Groups of v{from.number} matched to groups of v{to.number}</caption>
        <thead className="border-b border-ink/10 align-bottom text-ink-soft">
          <tr>
            <th scope="col" className="py-2 pr-3 font-bold">Group in v{from.number}</th>
            <th scope="col" className="py-2 pr-3 font-bold">Group in v{to.number}</th>
            <th scope="col" className="py-2 pr-3 text-right font-bold">Share of the data</th>
            {fields.map((f) => (
              <th key={f.feature} scope="col" className="py-2 pr-3 text-right font-bold">
                {f.label}
                {f.unit && <span className="block text-xs font-normal">mean, {f.unit}</span>}
              </th>
            ))}
            <th scope="col" className="py-2 text-right font-bold">
              Distance
              <span className="block text-xs font-normal">standardised</span>
            </th>
          </tr>
        </thead>
        <tbody>
          {pairs.map((p) => (
            <tr key={`${p.from.index}-${p.to.index}`} className="border-b border-ink/5 align-top">
              <td className="py-2 pr-3"><GroupName group={p.from} /></td>
              <td className="py-2 pr-3"><GroupName group={p.to} /></td>
              <td className="py-2 pr-3 text-right tabular-nums">
                <span className="font-bold">{signed(p.weight.shift * 100, 1)} pts</span>
                <span className="block text-xs text-ink-soft">{formatPercent(p.weight.from, 1)} → {formatPercent(p.weight.to, 1)}</span>
              </td>
              {p.meanShifts.map((m) => (
                <td key={m.feature} className="py-2 pr-3 text-right tabular-nums">
                  <span className="font-bold">{signed(m.shift, meanDecimals(m.from, m.to))}{m.unit ? ` ${m.unit}` : ''}</span>
                  <span className="block text-xs text-ink-soft">{formatNumber(m.from)} → {formatNumber(m.to)}</span>
                </td>
              ))}
              <td className="py-2 text-right tabular-nums">{formatFixed(p.distance, 2)}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

/** Groups one side has and the other does not, said plainly. */
export function UnmatchedGroups({ comparison }: { comparison: VersionComparison }) {
  const { from, to, unmatchedFrom, unmatchedTo } = comparison;
  if (!unmatchedFrom.length && !unmatchedTo.length) {
    return <p className="text-sm text-ink-soft">Every group has a partner: both versions have {from.groups.length} groups.</p>;
  }
  const side = (groups: GroupRef[], has: number, lacks: number) => (
    <li className="rounded-lg border border-saffron-500/40 bg-saffron-100 px-4 py-3">
      <p className="font-bold text-ink">
        {groups.length === 1 ? 'Only' : `${groups.length} groups only`} in v{has}, with no partner in v{lacks}:
      </p>
      <ul className="mt-1 flex flex-wrap gap-x-5 gap-y-1">
        {groups.map((g) => (
          <li key={g.index}>
            <GroupName group={g} /> <span className="text-ink-soft">({formatPercent(g.weight, 1)} of the data)</span>
          </li>
        ))}
      </ul>
    </li>
  );
  return (
    <ul className="space-y-2 text-sm" data-testid="compare-unmatched">
      {unmatchedFrom.length > 0 && side(unmatchedFrom, from.number, to.number)}
      {unmatchedTo.length > 0 && side(unmatchedTo, to.number, from.number)}
    </ul>
  );
}

/**
 * How the calculator (and the landing page's example answer) writes a membership
 * probability: Intl's percent style in English ("84%"), whole percents, and the two ends
 * as "over 99%" / "under 1%" so a rounded "100%" or "0%" never claims certainty.
 */
const wholePercent = new Intl.NumberFormat('en', { style: 'percent', maximumFractionDigits: 0 });

export function formatPercent(probability: number): string {
  if (probability >= 0.995) return `over ${wholePercent.format(0.99)}`;
  if (probability < 0.005) return `under ${wholePercent.format(0.01)}`;
  return wholePercent.format(probability);
}

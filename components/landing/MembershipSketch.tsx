import type { ExampleAnswer } from '@/lib/demo/example-answer';
import { formatProbability as formatPercent } from '@/lib/format';

const number = new Intl.NumberFormat('en');

/**
 * A calculator answer on the landing page: real output of the demo calculator for the
 * values shown (worked out on the server, see lib/demo/landing-example.ts), drawn without
 * script. Without a demo there are no numbers to show, so only the idea is described.
 */
export function MembershipSketch({ example }: { example: ExampleAnswer | null }) {
  return (
    <figure className="pw-card p-6" aria-label="Example of a calculator answer" data-testid="landing-example">
      <p className="text-sm font-bold text-ink-soft">Which ride group suits you?</p>
      {example ? (
        <>
          <dl className="mt-4 grid grid-cols-3 gap-3 text-sm">
            {example.values.map((v) => (
              <div key={v.feature} className="rounded-lg bg-paper-deep px-3 py-2 text-center" data-feature={v.feature} data-value={v.value}>
                <dt className="text-xs text-ink-soft">{v.label}</dt>
                <dd className="font-bold text-ink">
                  {number.format(v.value)}
                  {v.unit ? ` ${v.unit}` : ''}
                </dd>
              </div>
            ))}
          </dl>
          <p className="mt-5 font-bold text-ink" data-testid="landing-best">
            Most like: {example.best.label} <span className="font-normal">({formatPercent(example.best.probability)})</span>
          </p>
          <ul className="mt-4 space-y-3" aria-label="Membership probability per group">
            {example.probabilities.map((g) => (
              <li key={g.label} data-label={g.label}>
                <div className="flex justify-between text-sm">
                  <span>{g.label}</span>
                  <span className="font-bold tabular-nums" data-testid="landing-percent">{formatPercent(g.probability)}</span>
                </div>
                <div className="mt-1 h-3 rounded-full bg-paper-deep">
                  <div className="h-3 rounded-full" style={{ width: `${Math.max(g.probability * 100, 0.5)}%`, backgroundColor: g.color }} />
                </div>
              </li>
            ))}
          </ul>
          <figcaption className="mt-5 text-xs text-ink-faint">
            The demo calculator&apos;s answer for these values, from a club&apos;s own ride logs. Similarity to groups, not a verdict.
          </figcaption>
        </>
      ) : (
        <figcaption className="mt-4 text-sm text-ink-soft">
          A visitor types a few values and sees how closely they resemble each group found in the data, with a plain notice when they resemble
          none.
        </figcaption>
      )}
    </figure>
  );
}

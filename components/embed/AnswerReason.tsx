import type { AnswerReason as Reason } from '@/lib/scoring/score';
import type { Messages } from './messages';

/** Below this (in nats) a value is said to point to neither group: odds moved by under 5 %. */
const NEGLIGIBLE = 0.05;
/** From this on, "strongly": the value alone moves the odds by a factor of about 7. */
const STRONG = 2;

interface Group {
  label: string;
  color: string;
}

/**
 * "Why this group": the answer's log-odds between the best group and the runner-up,
 * value by value, as a short text list; each item carries a small bar (right = towards
 * the best group, left = towards the runner-up, length = share of the largest part).
 * The bars only repeat the words, so they are hidden from screen readers.
 */
export function AnswerReason({ reason, groups, labelOf, texts: t }: { reason: Reason; groups: Group[]; labelOf: (feature: string) => string; texts: Messages['reason'] }) {
  const best = groups[reason.best];
  const runnerUp = groups[reason.runnerUp];
  const items = [
    ...reason.fields.map((f) => ({ key: f.feature, title: t.position(labelOf(f.feature), t.bands[f.position]), contribution: f.contribution })),
    { key: 'group-size', title: t.groupSize, contribution: reason.weightTerm },
  ];
  const largest = Math.max(NEGLIGIBLE, ...items.map((i) => Math.abs(i.contribution)));
  const direction = (c: number, isSize: boolean) => {
    if (Math.abs(c) < NEGLIGIBLE) return isSize ? t.equallyCommon : t.neither;
    const group = c > 0 ? best.label : runnerUp.label;
    return isSize ? t.groupSizeTowards(group) : t.towards(group, Math.abs(c) >= STRONG);
  };

  return (
    <section className="space-y-2 border-t border-ink/10 pt-3 dark:border-white/15" aria-labelledby="partwise-reason-heading" data-testid="answer-reason">
      <h3 id="partwise-reason-heading" className="font-sans text-sm font-bold text-ink dark:text-[#f3efe7]">
        {t.heading}
      </h3>
      <p className="text-sm text-ink-soft dark:text-[#c9ced8]">{t.intro(best.label, runnerUp.label)}</p>
      <ul className="space-y-2.5" aria-label={t.chartLabel(best.label, runnerUp.label)} data-testid="reason-list">
        {items.map((item) => {
          const share = Math.min(1, Math.abs(item.contribution) / largest) * 50;
          const towardsBest = item.contribution >= 0;
          return (
            <li key={item.key} className="text-sm" data-feature={item.key} data-contribution={item.contribution}>
              <span className="font-bold text-ink dark:text-[#f3efe7]">{item.title}</span>
              <span className="text-ink-soft dark:text-[#c9ced8]"> {direction(item.contribution, item.key === 'group-size')}</span>
              <span aria-hidden="true" className="relative mt-1 block h-2 rounded-full bg-paper-deep dark:bg-[#262c3d]">
                <span className="absolute inset-y-[-2px] left-1/2 w-px bg-ink/40 dark:bg-white/40" />
                <span
                  className="absolute inset-y-0 rounded-full"
                  style={{ backgroundColor: towardsBest ? best.color : runnerUp.color, width: `${share}%`, [towardsBest ? 'left' : 'right']: '50%' }}
                />
              </span>
            </li>
          );
        })}
      </ul>
      <p aria-hidden="true" className="flex justify-between text-xs text-ink-soft dark:text-[#a9b0bf]">
        <span>← {runnerUp.label}</span>
        <span>{best.label} →</span>
      </p>
      {reason.decomposition === 'chain-rule' && reason.fields.length > 1 && <p className="text-xs text-ink-soft dark:text-[#a9b0bf]">{t.inOrder}</p>}
    </section>
  );
}

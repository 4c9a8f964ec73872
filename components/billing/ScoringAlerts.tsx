import type { ScoringAlert } from '@/lib/scoring/alerts';
import { formatCount as whole, formatDateTime } from '@/lib/format';

const WINDOW: Record<number, string> = { 1: 'a minute', 60: 'an hour', 1440: 'a day' };

const when = (iso: string) => formatDateTime(iso);

function describe(a: ScoringAlert, pauseThreshold: number): { title: string; detail: string; tone: 'warn' | 'stop' } {
  if (a.kind === 'burst') {
    return {
      title: `Burst turned away: ${a.calculator?.title ?? 'a calculator'}`,
      detail: `More than ${whole(a.limit)} answers asked in ${WINDOW[a.threshold] ?? `${a.threshold} minutes`}. The extra requests got a “busy, try again shortly” notice and used none of your answers.`,
      tone: 'warn',
    };
  }
  if (a.threshold >= pauseThreshold) {
    return { title: `Calculators paused for ${a.period}`, detail: `${whole(a.used)} answers: this month’s answers and the grace after them are used.`, tone: 'stop' };
  }
  return { title: `${a.threshold} % of ${a.period}’s answers used`, detail: `${whole(a.used)} of ${whole(a.limit)} answers.`, tone: 'warn' };
}

/** What the fair-use limits did lately, newest first; the owner was e-mailed about each. */
export function ScoringAlerts({ alerts, pauseThreshold }: { alerts: ScoringAlert[]; pauseThreshold: number }) {
  if (alerts.length === 0) return <p className="text-sm text-ink-soft">Nothing to report: no calculator was turned away and no monthly threshold was reached in the last 31 days.</p>;
  return (
    <ul className="grid gap-3">
      {alerts.map((a, i) => {
        const d = describe(a, pauseThreshold);
        return (
          <li key={`${a.kind}-${a.at}-${i}`} data-alert={a.kind} className={`rounded-lg border px-4 py-3 text-sm ${d.tone === 'stop' ? 'border-clay-500/30 bg-clay-100' : 'border-saffron-500/40 bg-saffron-100'}`}>
            <div className="flex flex-wrap items-baseline justify-between gap-2">
              <span className={`font-bold ${d.tone === 'stop' ? 'text-clay-700' : 'text-ink'}`}>{d.title}</span>
              <time dateTime={a.at} className="text-xs tabular-nums text-ink-soft">
                {when(a.at)}
              </time>
            </div>
            <p className="mt-1 text-ink-soft">{d.detail}</p>
          </li>
        );
      })}
    </ul>
  );
}

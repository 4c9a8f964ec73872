import type { UsageMeter } from '@/lib/billing/summary';
import { formatBytes as bytes, formatCount as whole } from '@/lib/format';

/** One progress bar per plan limit; colour shifts at 80 % and past 100 %. */
export function UsageMeters({ meters, pauseAt }: { meters: UsageMeter[]; pauseAt: number }) {
  return (
    <ul className="grid gap-5 sm:grid-cols-2">
      {meters.map((m) => {
        const share = m.limit > 0 ? m.used / m.limit : 0;
        const width = Math.min(100, Math.round(share * 100));
        const tone = share > 1 ? 'bg-clay-500' : share >= 0.8 ? 'bg-saffron-500' : 'bg-moss-500';
        const show = (v: number) => (m.unit === 'bytes' ? bytes(v) : whole(v));
        return (
          <li key={m.key} data-meter={m.key}>
            <div className="flex items-baseline justify-between gap-3 text-sm">
              <span className="font-bold text-ink">{m.label}</span>
              <span className="tabular-nums text-ink-soft">
                {show(m.used)} of {show(m.limit)}
              </span>
            </div>
            <div
              className="mt-1.5 h-2.5 overflow-hidden rounded-full bg-paper-deep"
              role="progressbar"
              aria-label={m.label}
              aria-valuemin={0}
              aria-valuemax={m.limit}
              aria-valuenow={m.used}
              aria-valuetext={`${show(m.used)} of ${show(m.limit)} (${Math.round(share * 100)}%)`}
            >
              <div className={`h-full rounded-full ${tone}`} style={{ width: `${width}%` }} />
            </div>
            <p className="mt-1 text-xs text-ink-faint">
              {m.note}
              {m.key === 'answers' && share >= 1 && (
                <span className="font-bold text-clay-700">
                  {' '}
                  · {m.used >= pauseAt ? 'calculators are paused until next month or an upgrade' : `grace: calculators pause after ${whole(pauseAt)}`}
                </span>
              )}
              {m.key === 'answers' && share >= 0.8 && share < 1 && <span className="font-bold text-saffron-700"> · over 80 % used</span>}
              {m.key !== 'answers' && share > 1 && <span className="font-bold text-clay-700"> · above this plan&apos;s limit</span>}
            </p>
          </li>
        );
      })}
    </ul>
  );
}

import { hourPeriod } from '@/lib/usage';

/**
 * Answers "in the last hour" from clock-hour buckets: the current bucket plus the
 * part of the previous bucket that still lies within the last 60 minutes (a sliding
 * window estimate, assuming the previous hour's answers were spread evenly).
 */
export interface HourWindow {
  current: string;
  previous: string;
  /** Share of the previous bucket inside the window, 1 at hh:00, 0 at hh:59:59. */
  previousWeight: number;
}

const HOUR_MS = 3_600_000;

export function hourWindow(now = new Date()): HourWindow {
  const intoHour = (now.getTime() % HOUR_MS) / HOUR_MS;
  return { current: hourPeriod(now), previous: hourPeriod(new Date(now.getTime() - HOUR_MS)), previousWeight: 1 - intoHour };
}

export function lastHourEstimate(current: number, previous: number, window: HourWindow): number {
  return Math.round(current + previous * window.previousWeight);
}

/** Hour periods (`YYYY-MM-DDTHH`) from `from` to `to` inclusive, oldest first. */
export function hourPeriodsBetween(from: Date, to: Date): string[] {
  const out: string[] = [];
  const start = Math.floor(from.getTime() / HOUR_MS) * HOUR_MS;
  for (let t = start; t <= to.getTime(); t += HOUR_MS) out.push(hourPeriod(new Date(t)));
  return out;
}

/** UTC days (`YYYY-MM-DD`) of the last `days` days ending with `now`'s day, oldest first. */
export function lastDays(days: number, now = new Date()): string[] {
  const out: string[] = [];
  const today = Date.UTC(now.getUTCFullYear(), now.getUTCMonth(), now.getUTCDate());
  for (let i = days - 1; i >= 0; i--) out.push(new Date(today - i * 24 * HOUR_MS).toISOString().slice(0, 10));
  return out;
}

export { HOUR_MS };

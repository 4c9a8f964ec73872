import { Op, QueryTypes } from 'sequelize';
import { recordAudit } from '@/lib/audit';
import { flushUsage } from '@/lib/usage';
import { AuditEvent, Embed, sequelize } from '@/models';
import { HOUR_MS, hourPeriodsBetween, hourWindow, lastHourEstimate } from './rates';

/**
 * Automatic review flag. A calculator whose answers in the last hour exceed
 * `multiple` × its usual hourly rate — the mean of the 168 hour buckets before the
 * last two hours (hours without answers count as 0; a younger calculator averages
 * over the hours it existed) — and at least `minAnswers`, gets `flaggedAt` set. It is
 * not switched off: staff look at it first, at the top of the console.
 */
export interface SpikeRules {
  multiple: number;
  minAnswers: number;
  /** After staff clear a flag, the same calculator is not flagged again for this long. */
  quietHours: number;
}

function envNumber(name: string, fallback: number): number {
  const v = Number(process.env[name]);
  return Number.isFinite(v) && v > 0 ? v : fallback;
}

export function spikeRules(): SpikeRules {
  return {
    multiple: envNumber('PARTWISE_SPIKE_MULTIPLE', 5),
    minAnswers: envNumber('PARTWISE_SPIKE_MIN_ANSWERS', 100),
    quietHours: envNumber('PARTWISE_SPIKE_QUIET_HOURS', 12),
  };
}

export const BASELINE_HOURS = 168;

export interface SpikeVerdict {
  embedId: number;
  lastHour: number;
  usualPerHour: number;
  spiking: boolean;
}

/** The rule on its own, for one calculator's numbers. */
export function isSpike(lastHour: number, usualPerHour: number, rules: SpikeRules): boolean {
  return lastHour >= rules.minAnswers && lastHour > rules.multiple * usualPerHour;
}

/** Usual hourly rate of one embed: the baseline window before the last two hours. */
export async function usualHourlyRate(embed: { id: number; createdAt: Date }, now = new Date()): Promise<number> {
  const end = new Date(now.getTime() - 2 * HOUR_MS);
  const start = new Date(end.getTime() - (BASELINE_HOURS - 1) * HOUR_MS);
  const periods = hourPeriodsBetween(start, end);
  await flushUsage();
  const [{ total }] = await sequelize.query<{ total: number | null }>(
    `SELECT SUM(count) AS total FROM usage_counters WHERE embed_id = :id AND granularity = 'hour' AND period >= :from AND period <= :to`,
    { replacements: { id: embed.id, from: periods[0], to: periods[periods.length - 1] }, type: QueryTypes.SELECT },
  );
  // Hours of the window in which the calculator existed (at least one).
  const existedFrom = Math.max(start.getTime(), Math.floor(new Date(embed.createdAt).getTime() / HOUR_MS) * HOUR_MS);
  const hours = Math.max(1, Math.min(BASELINE_HOURS, Math.floor((end.getTime() - existedFrom) / HOUR_MS) + 1));
  return Number(total ?? 0) / hours;
}

/**
 * Look at every serving calculator with enough recent answers to matter and flag the
 * ones that spike. Returns the verdicts for the candidates (flagged or not).
 */
export async function sweepForSpikes(now = new Date(), rules = spikeRules()): Promise<{ flagged: number[]; checked: SpikeVerdict[] }> {
  const window = hourWindow(now);
  await flushUsage();
  // Cheap filter first: the two latest buckets together bound the last-hour estimate.
  const candidates = await sequelize.query<{ embed_id: number; current: number; previous: number }>(
    `SELECT embed_id,
            SUM(CASE WHEN period = :current THEN count ELSE 0 END) AS current,
            SUM(CASE WHEN period = :previous THEN count ELSE 0 END) AS previous
     FROM usage_counters
     WHERE granularity = 'hour' AND period IN (:current, :previous)
     GROUP BY embed_id
     HAVING SUM(count) >= :min`,
    { replacements: { current: window.current, previous: window.previous, min: rules.minAnswers }, type: QueryTypes.SELECT },
  );
  if (!candidates.length) return { flagged: [], checked: [] };

  const embeds = await Embed.findAll({ where: { id: candidates.map((c) => c.embed_id), status: 'active', flaggedAt: null }, attributes: ['id', 'workspaceId', 'title', 'createdAt'] });
  const quietSince = new Date(now.getTime() - rules.quietHours * HOUR_MS);
  const recentlyCleared = new Set(
    (
      await AuditEvent.findAll({
        where: { action: 'support.flag_cleared', targetType: 'embed', targetId: embeds.map((e) => String(e.id)), createdAt: { [Op.gte]: quietSince } },
        attributes: ['targetId'],
      })
    ).map((e) => Number(e.targetId)),
  );

  const flagged: number[] = [];
  const checked: SpikeVerdict[] = [];
  for (const embed of embeds) {
    const c = candidates.find((x) => x.embed_id === embed.id)!;
    const lastHour = lastHourEstimate(Number(c.current), Number(c.previous), window);
    const usualPerHour = await usualHourlyRate(embed, now);
    const spiking = isSpike(lastHour, usualPerHour, rules);
    checked.push({ embedId: embed.id, lastHour, usualPerHour, spiking });
    if (!spiking || recentlyCleared.has(embed.id)) continue;
    // Conditional: a sweep in another process may have flagged it a moment ago.
    const [changed] = await Embed.update({ flaggedAt: now }, { where: { id: embed.id, flaggedAt: null } });
    if (changed !== 1) continue;
    flagged.push(embed.id);
    await recordAudit({
      action: 'support.embed_flagged',
      actor: null,
      workspaceId: embed.workspaceId,
      targetType: 'embed',
      targetId: embed.id,
      detail: { title: embed.title, lastHour, usualPerHour: Math.round(usualPerHour * 100) / 100, multiple: rules.multiple, minAnswers: rules.minAnswers },
    });
  }
  return { flagged, checked };
}

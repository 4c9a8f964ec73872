import { sweepInsight } from '@/lib/insight/sweeps';
import { sweepForSpikes } from './spikes';

/**
 * Inside the Next server, sweep for answer spikes every PARTWISE_SPIKE_SWEEP_MS
 * (default 5 minutes). One timer per process, kept on globalThis; several processes
 * may each run one: flagging is a conditional update, so a spike is flagged once.
 */
export function startSupportTimers(): void {
  if (process.env.NEXT_RUNTIME !== 'nodejs' || process.env.NEXT_PHASE === 'phase-production-build') return;
  const g = globalThis as { __partwiseSpikeSweep?: ReturnType<typeof setInterval> };
  if (g.__partwiseSpikeSweep) return;
  const every = Number(process.env.PARTWISE_SPIKE_SWEEP_MS);
  g.__partwiseSpikeSweep = setInterval(
    () => {
      sweepForSpikes().catch((e) => console.error('[partwise] spike sweep failed:', (e as Error).message));
    },
    Number.isFinite(every) && every >= 1000 ? every : 5 * 60_000,
  );
  g.__partwiseSpikeSweep.unref?.();
  startInsightSweep();
}

/**
 * Answer insight's retention and weekly mail (lib/insight/sweeps.ts) every
 * PARTWISE_INSIGHT_SWEEP_MS (default an hour): deleting is idempotent and each mail is
 * claimed by a conditional update, so several processes may each run one.
 */
function startInsightSweep(): void {
  const g = globalThis as { __partwiseInsightSweep?: ReturnType<typeof setInterval> };
  if (g.__partwiseInsightSweep) return;
  const every = Number(process.env.PARTWISE_INSIGHT_SWEEP_MS);
  g.__partwiseInsightSweep = setInterval(
    () => {
      sweepInsight().catch((e) => console.error('[partwise] insight sweep failed:', (e as Error).message));
    },
    Number.isFinite(every) && every >= 1000 ? every : 60 * 60_000,
  );
  g.__partwiseInsightSweep.unref?.();
}

import { QueryTypes } from 'sequelize';
import { ensureInsightBins, type VersionBins } from '@/lib/insight/bins';
import { addDays } from '@/lib/insight/aggregate';
import { utcDay } from '@/lib/insight/counters';
import { SeededRandom } from '@/lib/mixture';
import { Embed, InsightCount, ModelVersion, sequelize, type Workspace } from '@/models';

/**
 * Demo step 4: five weeks of invented answer-insight aggregates for the demo calculator,
 * so its insight tab has something to show. Every row is marked demo (the report then
 * says `demo: true`). The numbers are made up here, from a seeded PRNG: about 40–90
 * answers a day (more at weekends), visitors' values drawn from the training data's own
 * bins, except weekly distance, which drifts towards longer distances over the last
 * 10 days (as if a touring club had started linking to the calculator). Idempotent.
 */
export const DEMO_INSIGHT_DAYS = 35;
export const DEMO_DRIFT_DAYS = 10;
export const DEMO_DRIFT_FIELD = 'weekly_distance_km';
const SEED = 1616;

type Row = { day: string; kind: string; field: string; bin: number; count: number };

/** Draw an index with probability proportional to `weights`. */
function pick(rng: SeededRandom, weights: number[]): number {
  let total = 0;
  for (const w of weights) total += w;
  let u = rng.next() * total;
  for (let i = 0; i < weights.length; i++) {
    u -= weights[i];
    if (u < 0) return i;
  }
  return weights.length - 1;
}

/** The invented counters of the days [first, last] (UTC), deterministic for a seed. */
export function demoInsightRows(bins: VersionBins, groupWeights: number[], optional: Set<string>, last: string, days = DEMO_INSIGHT_DAYS, seed = SEED): Row[] {
  const rng = new SeededRandom(seed);
  const rows = new Map<string, Row>();
  const add = (day: string, kind: string, field: string, bin: number) => {
    const key = `${day}|${kind}|${field}|${bin}`;
    const hit = rows.get(key);
    if (hit) hit.count++;
    else rows.set(key, { day, kind, field, bin, count: 1 });
  };
  // Visitors' values are inside the input range: the training data's inner bins only.
  const inner = bins.training.map((t) => t.map((c, b) => (b === 0 || b === t.length - 1 ? 0 : c + 0.5)));
  for (let i = days - 1; i >= 0; i--) {
    const day = addDays(last, -i);
    const weekday = new Date(`${day}T00:00:00Z`).getUTCDay();
    const answers = Math.round((weekday === 0 || weekday === 6 ? 70 : 45) + rng.next() * 20);
    // 0 outside the last DEMO_DRIFT_DAYS, then rising to about two in three drifted visitors.
    const drift = i < DEMO_DRIFT_DAYS ? 0.25 + (0.45 * (DEMO_DRIFT_DAYS - 1 - i)) / (DEMO_DRIFT_DAYS - 1) : 0;
    for (let a = 0; a < answers; a++) {
      add(day, 'answers', '', -1);
      const drifted = rng.next() < drift;
      if (rng.next() < (drifted ? 0.09 : 0.03)) add(day, 'unusual', '', -1);
      add(day, 'group', '', pick(rng, groupWeights));
      let blank = false;
      bins.fields.forEach((f, j) => {
        if (optional.has(f.feature) && rng.next() < 0.12) {
          add(day, 'blank', f.feature, -1);
          blank = true;
          return;
        }
        let b = pick(rng, inner[j]);
        if (drifted && f.feature === DEMO_DRIFT_FIELD) b = Math.min(inner[j].length - 2, b + 3);
        add(day, 'bin', f.feature, b);
      });
      if (blank) add(day, 'with_blanks', '', -1);
    }
  }
  return [...rows.values()];
}

export async function seedDemoInsight(ctx: { workspace: Workspace }, now = new Date()): Promise<void> {
  const embed = await Embed.findOne({ where: { workspaceId: ctx.workspace.id }, order: [['id', 'ASC']] });
  if (!embed?.activeVersionId) return;
  if (await InsightCount.findOne({ where: { embedId: embed.id, demo: true } })) {
    console.log('[partwise] demo insight aggregates already present.');
    return;
  }
  const version = await ModelVersion.findByPk(embed.activeVersionId);
  if (!version) return;
  const bins = await ensureInsightBins(version);
  const payload = version.payload as { model?: { weights?: number[] }; fields?: { feature: string; optional?: boolean }[] };
  const weights = Array.isArray(payload.model?.weights) ? payload.model.weights : [1];
  const optional = new Set((payload.fields ?? []).filter((f) => f.optional).map((f) => f.feature));
  // Up to yesterday: today's counts are the real answers of the day.
  const rows = demoInsightRows(bins, weights, optional, addDays(utcDay(now), -1));
  for (let i = 0; i < rows.length; i += 2000) {
    const part = rows.slice(i, i + 2000);
    await sequelize.query(
      `INSERT INTO insight_counts (embed_id, version_id, day, kind, field, bin, count, demo) VALUES ${part.map(() => '(?, ?, ?, ?, ?, ?, ?, ?)').join(', ')}
       ON CONFLICT (embed_id, version_id, day, kind, field, bin) DO UPDATE SET count = insight_counts.count + excluded.count, demo = excluded.demo`,
      { replacements: part.flatMap((r) => [embed.id, version.id, r.day, r.kind, r.field, r.bin, r.count, true]), type: QueryTypes.INSERT },
    );
  }
  console.log(`[partwise] demo insight: ${DEMO_INSIGHT_DAYS} days of invented aggregates for "${embed.title}" (marked demo).`);
}

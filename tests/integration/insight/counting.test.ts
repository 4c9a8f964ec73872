import { beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { clearScoringCaches, invalidateEmbed, loadServedVersion } from '@/lib/scoring';
import { clearPendingInsight, pendingInsightAnswers, recordInsight } from '@/lib/insight/counters';
import { flushUsage } from '@/lib/usage';
import { ensureInsightBins, binsForFields } from '@/lib/insight/bins';
import { payloadChecksum, type VersionPayload } from '@/lib/embeds/payload';
import { Embed, InsightBins, InsightCount, ModelVersion, sequelize } from '@/models';
import { answer, insightCalculator, liftScoringLimits, republish, values } from './helpers';

type Calc = Awaited<ReturnType<typeof insightCalculator>>;
let calc: Calc;

const RANGES = { avg_speed_kmh: [10, 45], weekly_distance_km: [0, 500], climb_per_ride_m: [0, 3000] } as const;
const FIELDS = Object.keys(RANGES) as (keyof typeof RANGES)[];

/** The expected bin, worked out here on its own: 0 below, 1…12 the twelve equal parts (max in 12), 13 above. */
function expectedBin(v: number, [min, max]: readonly [number, number]): number {
  if (v < min) return 0;
  if (v > max) return 13;
  if (v === max) return 12;
  return 1 + Math.floor(((v - min) / (max - min)) * 12);
}

async function counts(embedId: number) {
  const rows = await InsightCount.findAll({ where: { embedId }, raw: true });
  const get = (kind: string, field = '', bin = -1, versionId?: number, day?: string) =>
    rows.filter((r) => r.kind === kind && r.field === field && r.bin === bin && (versionId === undefined || r.versionId === versionId) && (day === undefined || r.day === day)).reduce((s, r) => s + r.count, 0);
  return { rows, get };
}

beforeAll(async () => {
  calc = await insightCalculator();
});

beforeEach(() => {
  liftScoringLimits();
  clearPendingInsight();
});

describe('answer insight counting', () => {
  it('fixes the bins at publish: 12 equal bins over the input range plus below and above, with the training counts of the dataset rows or the model sample', async () => {
    const stored = await InsightBins.findByPk(calc.version.id);
    expect(stored).not.toBeNull();
    expect(stored!.bins.map((b) => b.feature)).toEqual(FIELDS);
    const speed = stored!.bins[0].edges;
    expect(speed).toHaveLength(15);
    for (let i = 0; i <= 12; i++) expect(speed[1 + i]).toBeCloseTo(10 + (i * 35) / 12, 10);
    expect(speed[13]).toBe(45);
    expect(speed[0]).toBeCloseTo(10 - 35 / 12, 10);
    expect(speed[14]).toBeCloseTo(45 + 35 / 12, 10);
    // The fixture's model has no dataset row in the workspace: its training side is the version's sample (2000 draws).
    expect(stored!.source).toBe('model-sample');
    for (const t of stored!.training) expect(t.reduce((s, c) => s + c, 0)).toBe(2000);
  });

  it('counts 500 concurrent answers exactly: answers, best groups, unusual, with blanks, per field per bin and blanks', async () => {
    const rand = values(42);
    const sent: Record<string, number | null>[] = [];
    for (let i = 0; i < 500; i++) {
      const row: Record<string, number | null> = {};
      for (const f of FIELDS) {
        const [min, max] = RANGES[f];
        row[f] = min + rand() * (max - min);
      }
      if (i % 7 === 0) row.climb_per_ride_m = null;
      if (i % 50 === 0) row.avg_speed_kmh = 45; // the maximum itself: the last inner bin
      sent.push(row);
    }
    const before = await counts(calc.embed.id);
    const answers = await Promise.all(sent.map((row, i) => answer(calc.embed.token, row, `198.51.100.${i % 200}`)));
    await flushUsage();
    expect(pendingInsightAnswers()).toBe(0);
    const after = await counts(calc.embed.id);
    const delta = (kind: string, field = '', bin = -1) => after.get(kind, field, bin) - before.get(kind, field, bin);

    expect(delta('answers')).toBe(500);
    expect(delta('unusual')).toBe(answers.filter((a) => a.unusual).length);
    expect(delta('with_blanks')).toBe(sent.filter((r) => r.climb_per_ride_m === null).length);
    for (let g = 0; g < 3; g++) expect(delta('group', '', g)).toBe(answers.filter((a) => a.best.index === g).length);
    for (const f of FIELDS) {
      expect(delta('blank', f)).toBe(sent.filter((r) => r[f] === null).length);
      for (let b = 0; b < 14; b++) {
        expect(delta('bin', f, b), `${f} bin ${b}`).toBe(sent.filter((r) => r[f] !== null && expectedBin(r[f]!, RANGES[f]) === b).length);
      }
    }
    // One row per counter key, whatever the number of flushes.
    const [dupes] = await sequelize.query('SELECT COUNT(*) AS n FROM (SELECT 1 FROM insight_counts GROUP BY embed_id, version_id, day, kind, field, bin HAVING COUNT(*) > 1) AS dup');
    expect((dupes as { n: number }[])[0].n).toBe(0);
  });

  it('counts nothing while insight is off for the calculator', async () => {
    await flushUsage();
    const before = await InsightCount.sum('count', { where: { embedId: calc.embed.id } });
    await calc.embed.update({ insightEnabled: false });
    invalidateEmbed(calc.embed.id);
    try {
      for (let i = 0; i < 20; i++) await answer(calc.embed.token, { avg_speed_kmh: 20, weekly_distance_km: 100, climb_per_ride_m: 300 });
      expect(pendingInsightAnswers()).toBe(0);
      await flushUsage();
      expect(await InsightCount.sum('count', { where: { embedId: calc.embed.id } })).toBe(before);
    } finally {
      await calc.embed.update({ insightEnabled: true });
      invalidateEmbed(calc.embed.id);
    }
  });

  it('rolls up by UTC day and by version: the counts land on the day and version they were made in', async () => {
    const other = await insightCalculator();
    const v1 = await loadServedVersion(other.version.id);
    const embed = { id: other.embed.id, insightEnabled: true };
    const row = [20, 100, 300];
    recordInsight(embed, v1.insight, row, 0, false, new Date('2026-11-30T23:59:59.999Z'));
    recordInsight(embed, v1.insight, row, 1, true, new Date('2026-12-01T00:00:00.000Z'));
    recordInsight(embed, v1.insight, row, 1, false, new Date('2026-12-01T12:00:00.000Z'));
    const { version: second } = await republish(other.acting, other.embed);
    clearScoringCaches();
    const v2 = await loadServedVersion(second.id);
    recordInsight(embed, v2.insight, [20, 100, null], 2, false, new Date('2026-12-01T18:00:00.000Z'));
    await flushUsage();
    const { get } = await counts(other.embed.id);
    expect(get('answers', '', -1, v1.id, '2026-11-30')).toBe(1);
    expect(get('answers', '', -1, v1.id, '2026-12-01')).toBe(2);
    expect(get('unusual', '', -1, v1.id, '2026-12-01')).toBe(1);
    expect(get('group', '', 1, v1.id, '2026-12-01')).toBe(2);
    expect(get('answers', '', -1, v2.id, '2026-12-01')).toBe(1);
    expect(get('with_blanks', '', -1, v2.id, '2026-12-01')).toBe(1);
    expect(get('blank', 'climb_per_ride_m', -1, v2.id, '2026-12-01')).toBe(1);
    expect(get('bin', 'avg_speed_kmh', expectedBin(20, RANGES.avg_speed_kmh), v2.id, '2026-12-01')).toBe(1);
    expect(get('answers', '', -1, v2.id, '2026-11-30')).toBe(0);
  });

  it('puts counts back when the write fails and writes them with the next flush', async () => {
    const other = await insightCalculator();
    const v = await loadServedVersion(other.version.id);
    recordInsight({ id: other.embed.id, insightEnabled: true }, v.insight, [20, 100, 300], 0, false, new Date('2026-12-02T10:00:00Z'));
    await sequelize.query('ALTER TABLE insight_counts RENAME TO insight_counts_away');
    try {
      await expect(flushUsage()).rejects.toThrow();
      expect(pendingInsightAnswers()).toBe(1);
    } finally {
      await sequelize.query('ALTER TABLE insight_counts_away RENAME TO insight_counts');
    }
    await flushUsage();
    expect(pendingInsightAnswers()).toBe(0);
    expect(await InsightCount.sum('count', { where: { embedId: other.embed.id, kind: 'answers' } })).toBe(1);
  });

  it('counts a version published before insight on its payload\'s bins without writing at serve time; the first report stores the same bins', async () => {
    const other = await insightCalculator();
    const payload = { model: other.model.model, clusters: other.model.clusters, fields: other.model.fields, caution: '' } as VersionPayload;
    const old = await ModelVersion.create({ embedId: other.embed.id, mixtureModelId: other.model.id, createdById: other.owner.id, number: 9, payload, checksum: payloadChecksum(payload) });
    await Embed.update({ activeVersionId: old.id }, { where: { id: other.embed.id } });
    invalidateEmbed(other.embed.id);
    clearScoringCaches();
    await answer(other.embed.token, { avg_speed_kmh: 20, weekly_distance_km: 100, climb_per_ride_m: 300 });
    expect(await InsightBins.findByPk(old.id)).toBeNull();
    await flushUsage();
    expect(await InsightCount.sum('count', { where: { versionId: old.id, kind: 'bin', field: 'avg_speed_kmh', bin: expectedBin(20, RANGES.avg_speed_kmh) } })).toBe(1);
    const stored = await ensureInsightBins(old.id);
    expect(stored.fields).toEqual(binsForFields(payload.fields));
    expect(await ensureInsightBins(old.id)).toEqual(stored);
  });
});

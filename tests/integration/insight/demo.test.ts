import { describe, expect, it } from 'vitest';
import { makeRequest } from '../../helpers/auth';
import { GET as reportRoute } from '@/app/api/embeds/[id]/insight/route';
import { DEMO_USERS } from '@/lib/demo/accounts';
import { DEMO_INSIGHT_DAYS } from '@/lib/demo/insight';
import { addDays } from '@/lib/insight/aggregate';
import { utcDay } from '@/lib/insight/counters';
import type { InsightReport } from '@/lib/insight/types';
import { Embed, InsightCount, User } from '@/models';
import { seedDemo } from '@/scripts/seed';

describe('demo seed: answer insight', () => {
  it('seeds five weeks of invented daily aggregates, marked demo, once, with a visible drift in weekly distance over the last days', async () => {
    await seedDemo();
    const owner = (await User.findOne({ where: { email: DEMO_USERS.owner.email } }))!;
    const embed = (await Embed.findOne({ order: [['id', 'ASC']] }))!;
    const rows = await InsightCount.count({ where: { embedId: embed.id } });
    await seedDemo();
    expect(await InsightCount.count({ where: { embedId: embed.id } })).toBe(rows);
    expect(await InsightCount.count({ where: { embedId: embed.id, demo: false } })).toBe(0);

    const res = await reportRoute(await makeRequest(`/api/embeds/${embed.id}/insight?days=60`, { userId: owner.id }), { params: Promise.resolve({ id: String(embed.id) }) });
    expect(res.status).toBe(200);
    const r: InsightReport = await res.json();
    expect(r.demo).toBe(true);
    expect(r.trainingSource).toBe('dataset');
    const withAnswers = r.days.filter((d) => d.answers > 0);
    expect(withAnswers).toHaveLength(DEMO_INSIGHT_DAYS);
    expect(withAnswers.at(-1)!.day).toBe(addDays(utcDay(new Date()), -1));
    for (const d of withAnswers) {
      expect(d.answers).toBeGreaterThanOrEqual(45);
      expect(d.byGroup.reduce((s, c) => s + c, 0)).toBe(d.answers);
      expect(d.unusual).toBeLessThan(d.answers / 3);
      expect(d.withBlanks).toBeGreaterThan(0);
    }
    const byField = Object.fromEntries(r.fields.map((f) => [f.feature, f]));
    expect(byField.weekly_distance_km.last7.band).toBe('act');
    expect(byField.avg_speed_kmh.last7.band).toBe('stable');
    expect(byField.climb_per_ride_m.last7.band).toBe('stable');
    expect(r.overall.last7.psi).toBe(byField.weekly_distance_km.last7.psi);
    expect(byField.climb_per_ride_m.blanks).toBeGreaterThan(0);
  });
});

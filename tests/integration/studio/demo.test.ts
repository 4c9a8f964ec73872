import { describe, expect, it } from 'vitest';
import { seedDemo } from '@/scripts/seed';
import { DEMO_MODEL_NAME } from '@/lib/demo/model';
import { Fit, MixtureModel } from '@/models';

describe('demo seed: fitted ride groups', () => {
  it('fits the ride logs, stores a succeeded fit and a named model, and is idempotent', async () => {
    await seedDemo();
    await seedDemo();
    const models = await MixtureModel.findAll({ where: { name: DEMO_MODEL_NAME } });
    expect(models).toHaveLength(1);
    const model = models[0];
    const engine = model.model as { weights: number[]; means: number[][]; structure: string; ranking: { rank: number | null }[]; features: { name: string }[] };
    expect(engine.features.map((f) => f.name)).toEqual(['avg_speed_kmh', 'weekly_distance_km', 'climb_per_ride_m']);
    expect(engine.ranking.length).toBe(12);
    const fit = (await Fit.findByPk(model.fitId!))!;
    expect(fit.status).toBe('succeeded');
    const best = (fit.result as any).candidates[0];
    expect(best.rank).toBe(1);
    expect(best.components).toBe(engine.weights.length);
    expect(best.covariance).toBe(engine.structure);
    // The invented data has four ride groups; the names follow the fitted means.
    expect(engine.weights.length).toBe(4);
    const byLabel = Object.fromEntries(model.clusters.map((c, k) => [c.label, engine.means[k]]));
    expect(Object.keys(byLabel).sort()).toEqual(['Easy social', 'Fast pack', 'Hill chasers', 'Steady tourers']);
    expect(byLabel['Hill chasers'][2]).toBeGreaterThan(900);
    expect(byLabel['Fast pack'][0]).toBeGreaterThan(29);
    expect(byLabel['Easy social'][0]).toBeLessThan(21);
    expect(byLabel['Steady tourers'][1]).toBeGreaterThan(110);
    expect(model.fields.map((f) => f.label)).toEqual(['Average speed', 'Weekly distance', 'Climbing per ride']);
    expect(model.caution).toMatch(/describe our club, not cyclists in general/);
  });
});

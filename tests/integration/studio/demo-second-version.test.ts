import { describe, expect, it } from 'vitest';
import { seedDemo } from '@/scripts/seed';
import { DEMO_MODEL_NAME } from '@/lib/demo/model';
import { DEMO_SECOND_MODEL_NAME } from '@/lib/demo/second-version';
import { compareCalculatorVersions } from '@/lib/embeds/version-compare-queries';
import { Embed, MixtureModel, ModelVersion } from '@/models';

describe('demo seed: a second, not served version of the demo calculator', () => {
  it('publishes a second fit as version 2, keeps version 1 served, carries the names over, and is idempotent', async () => {
    await seedDemo();
    await seedDemo();
    const embed = (await Embed.findOne({ order: [['id', 'ASC']] }))!;
    const versions = await ModelVersion.findAll({ where: { embedId: embed.id }, order: [['number', 'ASC']] });
    expect(versions.map((v) => v.number)).toEqual([1, 2]);
    expect(embed.activeVersionId).toBe(versions[0].id);
    const first = (await MixtureModel.findOne({ where: { name: DEMO_MODEL_NAME } }))!;
    const second = (await MixtureModel.findOne({ where: { name: DEMO_SECOND_MODEL_NAME } }))!;
    expect(versions[1].mixtureModelId).toBe(second.id);
    expect(second.fitId).not.toBe(first.fitId);
    expect(second.datasetId).toBe(first.datasetId);
    const engine = second.model as { weights: number[]; structure: string };
    expect([engine.weights.length, engine.structure]).toEqual([5, 'diagonal']);

    // The comparison the studio shows: the four named groups found again, the fifth called out.
    const { comparison, dataset } = await compareCalculatorVersions(embed.workspaceId, embed.id, versions[0].id, versions[1].id);
    expect(comparison.pairs).toHaveLength(4);
    for (const p of comparison.pairs) expect(p.to.label).toBe(p.from.label);
    expect(comparison.unmatchedTo).toHaveLength(1);
    const extra = comparison.unmatchedTo[0];
    expect(extra.label).toMatch(/^(Easy social|Steady tourers|Hill chasers|Fast pack), /);
    expect(first.clusters.map((c) => c.color)).not.toContain(extra.color);
    expect(dataset?.rows).toBe(comparison.rows?.count);
    expect(comparison.rows!.changedShare).toBeGreaterThan(0);
  });
});

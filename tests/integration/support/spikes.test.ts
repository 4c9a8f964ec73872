import { beforeAll, describe, expect, it } from 'vitest';
import { GET as searchRoute } from '@/app/api/support/calculators/route';
import { POST as clearFlagRoute } from '@/app/api/support/calculators/[id]/clear-flag/route';
import { isSpike, searchCalculators, searchQuerySchema, spikeRules, sweepForSpikes, usualHourlyRate } from '@/lib/support';
import { AuditEvent, Embed } from '@/models';
import { makeRequest } from '../../helpers/auth';
import { calculator, hoursBefore, setUsage, staffUser, workspaceWithOwner } from './fixtures';

// Half past the hour: the previous bucket counts half towards "the last hour".
const NOW = new Date('2026-11-20T10:30:00Z');
const LONG_AGO = new Date('2026-10-01T00:00:00Z');
const rules = { multiple: 5, minAnswers: 100, quietHours: 12 };
const e: Record<string, Embed> = {};
let staffId: number;

/** 168 baseline hours (2…169 hours ago) at `perHour`, then the two latest buckets. */
function history(perHour: (h: number) => number, previous: number, current: number): Record<string, number> {
  const entries: [number, number][] = [[0, current], [1, previous]];
  for (let h = 2; h < 170; h++) entries.push([h, perHour(h)]);
  return hoursBefore(NOW, entries.filter(([, c]) => c > 0));
}

beforeAll(async () => {
  staffId = (await staffUser()).id;
  const { workspace } = await workspaceWithOwner({ name: 'Spiky Spokes', plan: 'lab' });
  const make = (title: string, createdAt = LONG_AGO, status: 'active' | 'disabled' = 'active') => calculator(workspace, { title, createdAt, status });
  e.steady = await make('Steady');
  e.spiking = await make('Spiking');
  e.busy = await make('Busy');
  e.tiny = await make('Tiny');
  e.newcomer = await make('Newcomer', new Date('2026-11-20T10:00:00Z'));
  e.off = await make('Switched off', LONG_AGO, 'disabled');
  await setUsage(e.steady, { hours: history(() => 10, 40, 30) });
  await setUsage(e.spiking, { hours: history(() => 10, 100, 200) });
  await setUsage(e.busy, { hours: history(() => 100, 300, 300) });
  await setUsage(e.tiny, { hours: history((h) => h % 2, 30, 60) });
  await setUsage(e.newcomer, { hours: hoursBefore(NOW, [[0, 150]]) });
  await setUsage(e.off, { hours: history(() => 1, 500, 500) });
});

describe('automatic spike flag', () => {
  it('states the rule: over the multiple of the usual rate AND over the minimum count', () => {
    expect(isSpike(250, 10, rules)).toBe(true);
    expect(isSpike(450, 100, rules)).toBe(false);
    expect(isSpike(99, 0, rules)).toBe(false);
    expect(isSpike(100, 0, rules)).toBe(true);
    expect(spikeRules()).toEqual({ multiple: 5, minAnswers: 100, quietHours: 12 });
  });

  it('measures the usual rate over the 168 hours before the last two, and over a young calculator\'s own hours', async () => {
    expect(await usualHourlyRate(e.steady, NOW)).toBe(10);
    expect(await usualHourlyRate(e.busy, NOW)).toBe(100);
    expect(await usualHourlyRate(e.tiny, NOW)).toBe(0.5);
    expect(await usualHourlyRate(e.newcomer, NOW)).toBe(0);
  });

  it('flags only the spiking calculators (not disabled ones), without switching them off, and audits it', async () => {
    const { flagged, checked } = await sweepForSpikes(NOW, rules);
    expect(flagged.sort()).toEqual([e.spiking.id, e.newcomer.id].sort());
    expect(checked.find((c) => c.embedId === e.spiking.id)).toMatchObject({ lastHour: 250, usualPerHour: 10, spiking: true });
    expect(checked.find((c) => c.embedId === e.busy.id)).toMatchObject({ lastHour: 450, spiking: false });
    for (const key of ['steady', 'busy', 'tiny', 'off']) expect((await Embed.findByPk(e[key].id))!.flaggedAt, key).toBeNull();
    const spiking = (await Embed.findByPk(e.spiking.id))!;
    expect(spiking.flaggedAt?.toISOString()).toBe(NOW.toISOString());
    expect(spiking.status).toBe('active');
    const audits = await AuditEvent.findAll({ where: { action: 'support.embed_flagged' }, order: [['id', 'ASC']] });
    expect(audits).toHaveLength(2);
    expect(audits.find((a) => a.targetId === String(e.spiking.id))!.detail).toMatchObject({ lastHour: 250, usualPerHour: 10, multiple: 5 });
    expect(audits[0].actorUserId).toBeNull();
  });

  it('does not flag twice', async () => {
    expect((await sweepForSpikes(NOW, rules)).flagged).toEqual([]);
    expect(await AuditEvent.count({ where: { action: 'support.embed_flagged' } })).toBe(2);
  });

  it('puts flagged calculators at the top of the console', async () => {
    const page = await searchCalculators(searchQuerySchema.parse({}), NOW);
    expect(page.rows.slice(0, 2).map((r) => r.title).sort()).toEqual(['Newcomer', 'Spiking']);
    expect(page.rows.slice(0, 2).every((r) => r.flaggedAt !== null)).toBe(true);
    const res = await searchRoute(await makeRequest('/api/support/calculators?status=flagged', { userId: staffId }), { params: Promise.resolve({}) });
    expect((await res.json()).total).toBe(2);
  });

  it('clearing a flag (staff reviewed it) is audited and is not undone by the next sweep', async () => {
    const clear = async (id: number) =>
      clearFlagRoute(await makeRequest(`/api/support/calculators/${id}/clear-flag`, { userId: staffId, json: { note: 'Club newsletter went out; expected.' } }), { params: Promise.resolve({ id: String(id) }) });
    expect((await clear(e.spiking.id)).status).toBe(200);
    expect((await Embed.findByPk(e.spiking.id))!.flaggedAt).toBeNull();
    expect((await clear(e.spiking.id)).status).toBe(409);
    const event = await AuditEvent.findOne({ where: { action: 'support.flag_cleared' } });
    expect(event).toMatchObject({ targetId: String(e.spiking.id) });
    expect(event!.detail).toMatchObject({ note: 'Club newsletter went out; expected.' });
    expect((await sweepForSpikes(NOW, rules)).flagged).toEqual([]);
  });
});

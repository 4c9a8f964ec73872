/**
 * Fault: a stored model version damaged after publishing (payload edited in the
 * database, or its checksum). That calculator answers 503 "unavailable" and counts
 * nothing; every other calculator, in the same workspace too, keeps answering.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { POST as scorePOST } from '@/app/api/score/[token]/route';
import { publishNew } from '@/lib/embeds/service';
import { clearScoringCaches } from '@/lib/scoring';
import { Embed, ModelVersion, UsageCounter, Workspace, User } from '@/models';
import { makeRequest } from '../../helpers/auth';
import { modelWorkspace } from '../embeds/fixtures';

const values = { avg_speed_kmh: 24, weekly_distance_km: 120, climb_per_ride_m: 400 };
let tokens: string[] = [];
let ip = 0;
const score = async (token: string) => {
  const res = await scorePOST(await makeRequest(`/api/score/${token}`, { json: { values }, headers: { 'x-forwarded-for': `192.0.2.${++ip}` } }), { params: Promise.resolve({ token }) });
  return { status: res.status, body: (await res.json()) as { error?: { message: string } } };
};

beforeAll(async () => {
  const ws = await modelWorkspace();
  const acting = { user: (await User.findByPk(ws.owner.id))!, isStaff: false, workspace: (await Workspace.findByPk(ws.workspace.id))!, role: 'owner' as const, request: new Request('http://localhost:3000/') };
  for (const title of ['Damaged payload', 'Damaged checksum', 'Healthy']) tokens.push((await publishNew(acting as never, { mixtureModelId: ws.model.id, title })).embed.token);
  for (const t of tokens) expect((await score(t)).status).toBe(200);
});

describe('a corrupted stored model version', () => {
  it('makes only its own calculator unavailable, without counting', async () => {
    const [payloadToken, checksumToken, healthyToken] = tokens;
    const v1 = (await ModelVersion.findByPk((await Embed.findOne({ where: { token: payloadToken } }))!.activeVersionId!))!;
    const payload = structuredClone(v1.payload) as { model: { weights: number[] } };
    payload.model.weights = payload.model.weights.map((w, i) => (i === 0 ? w + 0.5 : w));
    await ModelVersion.update({ payload: payload as never }, { where: { id: v1.id } });
    const v2 = (await Embed.findOne({ where: { token: checksumToken } }))!.activeVersionId!;
    await ModelVersion.update({ checksum: 'f'.repeat(64) }, { where: { id: v2 } });
    clearScoringCaches(); // as after a restart: the damaged rows are read again

    const countsBefore = await UsageCounter.sum('count', { where: { granularity: 'month' } });
    for (const t of [payloadToken, checksumToken]) {
      const r = await score(t);
      expect(r.status).toBe(503);
      expect(r.body.error?.message).toMatch(/temporarily unavailable/);
    }
    expect(await UsageCounter.sum('count', { where: { granularity: 'month' } })).toBe(countsBefore);
    const healthy = await score(healthyToken);
    expect(healthy.status).toBe(200);
    expect(await UsageCounter.sum('count', { where: { granularity: 'month' } })).toBe(countsBefore + 1);
  });
});

/**
 * Fault: a stored model version damaged after publishing (payload edited in the
 * database, or its checksum). That calculator answers 503 "unavailable" and counts
 * nothing; every other calculator, in the same workspace too, keeps answering. The
 * studio names the damage, and a damaged version cannot be chosen to serve again.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { POST as scorePOST } from '@/app/api/score/[token]/route';
import { publishNew, publishVersion, setActiveVersion } from '@/lib/embeds/service';
import { calculatorDetail } from '@/lib/embeds/studio-queries';
import { clearScoringCaches } from '@/lib/scoring';
import { flushUsage } from '@/lib/usage';
import { Embed, ModelVersion, UsageCounter, Workspace, User } from '@/models';
import { makeRequest } from '../../helpers/auth';
import { modelWorkspace } from '../embeds/fixtures';

const values = { avg_speed_kmh: 24, weekly_distance_km: 120, climb_per_ride_m: 400 };
let tokens: string[] = [];
let acting: Parameters<typeof setActiveVersion>[0];
let ip = 0;
const score = async (token: string) => {
  const res = await scorePOST(await makeRequest(`/api/score/${token}`, { json: { values }, headers: { 'x-forwarded-for': `192.0.2.${++ip}` } }), { params: Promise.resolve({ token }) });
  return { status: res.status, body: (await res.json()) as { error?: { message: string } } };
};

beforeAll(async () => {
  const ws = await modelWorkspace();
  acting = { user: (await User.findByPk(ws.owner.id))!, workspace: (await Workspace.findByPk(ws.workspace.id))! };
  for (const title of ['Damaged payload', 'Damaged checksum', 'Healthy']) tokens.push((await publishNew(acting, { mixtureModelId: ws.model.id, title })).embed.token);
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

    await flushUsage();
    const countsBefore = await UsageCounter.sum('count', { where: { granularity: 'month' } });
    for (const t of [payloadToken, checksumToken]) {
      const r = await score(t);
      expect(r.status).toBe(503);
      expect(r.body.error?.message).toMatch(/temporarily unavailable/);
    }
    await flushUsage();
    expect(await UsageCounter.sum('count', { where: { granularity: 'month' } })).toBe(countsBefore);
    const healthy = await score(healthyToken);
    expect(healthy.status).toBe(200);
    await flushUsage();
    expect(await UsageCounter.sum('count', { where: { granularity: 'month' } })).toBe(countsBefore + 1);
  });

  it('is named in the studio, cannot be served again, and a new version mends the calculator', async () => {
    const embed = (await Embed.findOne({ where: { token: tokens[0] } }))!;
    const damagedId = embed.activeVersionId!;
    const detail = await calculatorDetail(embed.workspaceId, embed.id);
    const damaged = detail.versions.find((v) => v.id === damagedId)!;
    expect(damaged.problem).toMatch(/no longer matches the checksum/);
    const healthy = await calculatorDetail(embed.workspaceId, (await Embed.findOne({ where: { token: tokens[2] } }))!.id);
    expect(healthy.versions.every((v) => v.problem === null)).toBe(true);

    // A fresh version is served; going back to the damaged one is refused with the reason.
    const { version } = await publishVersion(acting, embed.id);
    expect((await score(tokens[0])).status).toBe(200);
    await expect(setActiveVersion(acting, embed.id, damagedId)).rejects.toMatchObject({ code: 'conflict', message: expect.stringMatching(/Version 1 cannot be served: .*checksum/) });
    expect((await Embed.findByPk(embed.id))!.activeVersionId).toBe(version.id);
  });
});

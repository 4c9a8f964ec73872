import { actionLabel, detailSummary } from '@/lib/support/audit-words';
import { beforeAll, describe, expect, it } from 'vitest';
import { NextRequest } from 'next/server';
import { makeRequest } from '../../helpers/auth';
import { GET as listEmbedsRoute, POST as publishRoute } from '@/app/api/embeds/route';
import { GET as embedRoute, PATCH as settingsRoute } from '@/app/api/embeds/[id]/route';
import { GET as versionsRoute, POST as publishAgainRoute } from '@/app/api/embeds/[id]/versions/route';
import { PUT as activeVersionRoute } from '@/app/api/embeds/[id]/active-version/route';
import { POST as rotateRoute } from '@/app/api/embeds/[id]/rotate/route';
import { POST as retireRoute } from '@/app/api/embeds/[id]/retire/route';
import { POST as scoreRoute } from '@/app/api/score/[token]/route';
import { proxy } from '@/proxy';
import { payloadChecksum } from '@/lib/embeds/payload';
import { AuditEvent, Embed, MixtureModel, ModelVersion } from '@/models';
import { createModel, modelWorkspace } from './fixtures';

const idCtx = (id: number) => ({ params: Promise.resolve({ id: String(id) }) });
const tokenCtx = (token: string) => ({ params: Promise.resolve({ token }) });
const values = { avg_speed_kmh: 24, weekly_distance_km: 130, climb_per_ride_m: 420 };

async function score(token: string) {
  return scoreRoute(await makeRequest(`/api/score/${token}`, { json: { values } }), tokenCtx(token));
}

let ws: Awaited<ReturnType<typeof modelWorkspace>>;
beforeAll(async () => {
  ws = await modelWorkspace();
});

async function publish(body: unknown, userId = ws.member.id) {
  return publishRoute(await makeRequest('/api/embeds', { userId, workspaceId: ws.workspace.id, json: body }), { params: Promise.resolve({}) });
}

describe('publishing a calculator', () => {
  it('creates an embed with an unguessable token and an immutable first version with a checksum', async () => {
    const res = await publish({ mixtureModelId: ws.model.id, title: 'Which ride group?', allowedOrigins: ['https://club.example'] });
    expect(res.status).toBe(201);
    const body = await res.json();
    expect(body.embed.token).toMatch(/^[A-Za-z0-9_-]{21,}$/);
    expect(body.embed.activeVersionId).toBe(body.version.id);
    expect(body.version.number).toBe(1);
    const stored = await ModelVersion.findByPk(body.version.id);
    expect(stored!.checksum).toBe(payloadChecksum(stored!.payload as never));
    expect(stored!.checksum).toMatch(/^[0-9a-f]{64}$/);
    expect((stored!.payload as { caution: string }).caution).toBe('Try a group ride before you decide.');
    const audit = await AuditEvent.findOne({ where: { action: 'embed.publish', targetId: String(body.embed.id) } });
    expect(audit?.actorUserId).toBe(ws.member.id);

    // Editing the model later leaves the published version as it was.
    await ws.model.update({ caution: 'Changed after publishing.' });
    const again = await ModelVersion.findByPk(body.version.id);
    expect((again!.payload as { caution: string }).caution).toBe('Try a group ride before you decide.');
    await ws.model.update({ caution: 'Try a group ride before you decide.' });

    const tokens = new Set<string>();
    for (let i = 0; i < 3; i++) tokens.add((await (await publish({ mixtureModelId: ws.model.id })).json()).embed.token);
    expect(tokens.size).toBe(3);
  });

  it('asks for the website at publish and keeps only the origin of a pasted page address', async () => {
    const res = await publish({ mixtureModelId: ws.model.id, allowedOrigins: ['https://Club.Example/rides/join?x=1'] });
    expect(res.status).toBe(201);
    expect((await res.json()).embed.allowedOrigins).toEqual(['https://club.example']);
    const bad = await publish({ mixtureModelId: ws.model.id, allowedOrigins: ['club.example/rides'] });
    expect(bad.status).toBe(422);
    const issue = (await bad.json()).error.issues[0];
    expect(issue.field).toBe('allowedOrigins.0');
    expect(issue.message).toMatch(/must start with https:\/\//);
  });

  it('refuses a model that is not ready, naming the setting to fix', async () => {
    const broken = await createModel(ws.workspace.id, ws.owner.id, 3, 'Unnamed');
    await broken.update({ clusters: broken.clusters.map((c, i) => (i === 1 ? { ...c, label: '', color: 'green' } : c)) });
    const res = await publish({ mixtureModelId: broken.id });
    expect(res.status).toBe(422);
    const fields = (await res.json()).error.issues.map((i: { field: string }) => i.field);
    expect(fields).toEqual(expect.arrayContaining(['clusters.1.label', 'clusters.1.color']));
  });

  it('hides other workspaces: their models and embeds answer 404', async () => {
    const other = await modelWorkspace();
    const res = await publish({ mixtureModelId: other.model.id });
    expect(res.status).toBe(404);
    const theirs = await (await publishRoute(await makeRequest('/api/embeds', { userId: other.owner.id, json: { mixtureModelId: other.model.id } }), { params: Promise.resolve({}) })).json();
    const peek = await embedRoute(await makeRequest(`/api/embeds/${theirs.embed.id}`, { userId: ws.owner.id }), idCtx(theirs.embed.id));
    expect(peek.status).toBe(404);
    const list = await (await listEmbedsRoute(await makeRequest('/api/embeds', { userId: ws.owner.id }), { params: Promise.resolve({}) })).json();
    expect(list.embeds.every((e: { id: number }) => e.id !== theirs.embed.id)).toBe(true);
  });

  it('honours the plan: the free plan publishes one calculator; retiring frees the place', async () => {
    const small = await modelWorkspace({ plan: 'sketch' });
    const pub = async () => publishRoute(await makeRequest('/api/embeds', { userId: small.owner.id, json: { mixtureModelId: small.model.id } }), { params: Promise.resolve({}) });
    const first = await pub();
    expect(first.status).toBe(201);
    const second = await pub();
    expect(second.status).toBe(402);
    expect((await second.json()).error.message).toMatch(/Sketch/);
    const { embed } = await first.json();
    expect((await retireRoute(await makeRequest(`/api/embeds/${embed.id}/retire`, { method: 'POST', userId: small.owner.id }), idCtx(embed.id))).status).toBe(200);
    expect((await pub()).status).toBe(201);
  });
});

describe('versions, rollback, rotation and retirement', () => {
  it('publishes again as version 2, serves it, and rolls back to version 1', async () => {
    const { embed } = await (await publish({ mixtureModelId: ws.model.id })).json();
    const twoGroups = await createModel(ws.workspace.id, ws.owner.id, 2, 'Two groups');
    const res = await publishAgainRoute(await makeRequest(`/api/embeds/${embed.id}/versions`, { userId: ws.member.id, json: { mixtureModelId: twoGroups.id } }), idCtx(embed.id));
    expect(res.status).toBe(201);
    const v2 = (await res.json()).version;
    expect(v2.number).toBe(2);
    expect((await (await score(embed.token)).json()).probabilities).toHaveLength(2);

    const versions = (await (await versionsRoute(await makeRequest(`/api/embeds/${embed.id}/versions`, { userId: ws.member.id }), idCtx(embed.id))).json()).versions;
    expect(versions.map((v: { number: number }) => v.number)).toEqual([2, 1]);
    const v1 = versions[1];
    const back = await activeVersionRoute(await makeRequest(`/api/embeds/${embed.id}/active-version`, { method: 'PUT', userId: ws.member.id, json: { versionId: v1.id } }), idCtx(embed.id));
    expect(back.status).toBe(200);
    const answer = await (await score(embed.token)).json();
    expect(answer.probabilities).toHaveLength(3);
    expect(answer.version).toBe(1);

    // A version of another embed cannot be chosen.
    const { version: foreign } = await (await publish({ mixtureModelId: ws.model.id })).json();
    const wrong = await activeVersionRoute(await makeRequest(`/api/embeds/${embed.id}/active-version`, { method: 'PUT', userId: ws.member.id, json: { versionId: foreign.id } }), idCtx(embed.id));
    expect(wrong.status).toBe(404);

    // Publishing without activating keeps serving the chosen version.
    const quiet = await publishAgainRoute(await makeRequest(`/api/embeds/${embed.id}/versions`, { userId: ws.member.id, json: { activate: false } }), idCtx(embed.id));
    expect((await quiet.json()).version.number).toBe(3);
    expect((await (await score(embed.token)).json()).version).toBe(1);
  });

  it('rotates the token: the old one answers 404 at once, the new one answers', async () => {
    const { embed } = await (await publish({ mixtureModelId: ws.model.id })).json();
    expect((await score(embed.token)).status).toBe(200);
    const res = await rotateRoute(await makeRequest(`/api/embeds/${embed.id}/rotate`, { method: 'POST', userId: ws.member.id }), idCtx(embed.id));
    const rotated = (await res.json()).embed;
    expect(rotated.token).not.toBe(embed.token);
    expect(rotated.token.length).toBeGreaterThanOrEqual(21);
    expect((await score(embed.token)).status).toBe(404);
    expect((await score(rotated.token)).status).toBe(200);
    expect(await AuditEvent.count({ where: { action: 'embed.rotate_token', targetId: String(embed.id) } })).toBe(1);
  });

  it('retires: scoring answers 410, and the embed can no longer be changed', async () => {
    const { embed } = await (await publish({ mixtureModelId: ws.model.id })).json();
    const res = await retireRoute(await makeRequest(`/api/embeds/${embed.id}/retire`, { method: 'POST', userId: ws.member.id }), idCtx(embed.id));
    expect((await res.json()).embed.status).toBe('retired');
    expect((await score(embed.token)).status).toBe(410);
    const again = await publishAgainRoute(await makeRequest(`/api/embeds/${embed.id}/versions`, { userId: ws.member.id, json: {} }), idCtx(embed.id));
    expect(again.status).toBe(409);
    expect(await AuditEvent.count({ where: { action: 'embed.retire', targetId: String(embed.id) } })).toBe(1);
  });
});

describe('allowed origins and the frame policy', () => {
  it('validates and normalises origins, with a message per bad entry', async () => {
    const { embed } = await (await publish({ mixtureModelId: ws.model.id })).json();
    const patch = async (json: unknown) => settingsRoute(await makeRequest(`/api/embeds/${embed.id}`, { method: 'PATCH', userId: ws.member.id, json }), idCtx(embed.id));
    const bad = await patch({ allowedOrigins: ['https://ok.example', 'ftp://files.example', 'https://user:pw@club.example/page', '*.example.com', 'not a url'] });
    expect(bad.status).toBe(422);
    const issues = (await bad.json()).error.issues;
    expect(issues.map((i: { field: string }) => i.field)).toEqual(['allowedOrigins.1', 'allowedOrigins.2', 'allowedOrigins.3', 'allowedOrigins.4']);
    expect(issues[1].message).toMatch(/user name or password/);

    // A pasted page address keeps its origin only.
    const good = await patch({ allowedOrigins: ['HTTPS://Club.Example:443/', 'http://localhost:4000', 'https://club.example/rides/join?x=1'], theme: 'dark', accentColor: '#e0a526', typicalityThreshold: 5 });
    expect(good.status).toBe(200);
    const saved = (await good.json()).embed;
    expect(saved.allowedOrigins).toEqual(['https://club.example', 'http://localhost:4000']);
    expect(saved.theme).toBe('dark');
    expect(saved.typicalityThreshold).toBe(5);
  });

  it('sends frame-ancestors built from the allowed origins on the calculator page', async () => {
    const { embed } = await (await publish({ mixtureModelId: ws.model.id, allowedOrigins: ['https://club.example', 'http://localhost:4000'] })).json();
    const csp = async (path: string) => (await proxy(new NextRequest(new URL(path, 'http://localhost:3000')))).headers.get('content-security-policy');
    expect(await csp(`/embed/${embed.token}`)).toMatch(/^frame-ancestors 'self' https:\/\/club\.example http:\/\/localhost:4000;/);

    await settingsRoute(await makeRequest(`/api/embeds/${embed.id}`, { method: 'PATCH', userId: ws.member.id, json: { allowedOrigins: ['https://other.example'] } }), idCtx(embed.id));
    const after = await csp(`/embed/${embed.token}`);
    expect(after).toMatch(/^frame-ancestors 'self' https:\/\/other\.example;/);
    expect(after).not.toContain('club.example');

    await settingsRoute(await makeRequest(`/api/embeds/${embed.id}`, { method: 'PATCH', userId: ws.member.id, json: { allowedOrigins: [] } }), idCtx(embed.id));
    expect(await csp(`/embed/${embed.token}`)).toMatch(/^frame-ancestors 'self';/);
    expect(await csp('/embed/NoSuchTokenAtAll_12345678')).toMatch(/^frame-ancestors 'self';/);
  });

  it('stores settings only for the own workspace and records origin changes in the audit trail', async () => {
    const { embed } = await (await publish({ mixtureModelId: ws.model.id })).json();
    const other = await modelWorkspace();
    const res = await settingsRoute(await makeRequest(`/api/embeds/${embed.id}`, { method: 'PATCH', userId: other.owner.id, json: { title: 'Taken over' } }), idCtx(embed.id));
    expect(res.status).toBe(404);
    expect((await Embed.findByPk(embed.id))!.title).not.toBe('Taken over');
    await settingsRoute(await makeRequest(`/api/embeds/${embed.id}`, { method: 'PATCH', userId: ws.owner.id, json: { allowedOrigins: ['https://club.example'] } }), idCtx(embed.id));
    expect(await AuditEvent.count({ where: { action: 'embed.origins', targetId: String(embed.id) } })).toBe(1);
    // The settings form sends every field: a theme change with the same sites is a settings change, not a sites change.
    // (An accent that suits the dark theme too, set without an audit entry, so the theme is the only change.)
    await Embed.update({ accentColor: '#2f705f' }, { where: { id: embed.id } });
    await settingsRoute(await makeRequest(`/api/embeds/${embed.id}`, { method: 'PATCH', userId: ws.owner.id, json: { allowedOrigins: ['https://club.example'], theme: 'dark', title: embed.title } }), idCtx(embed.id));
    expect(await AuditEvent.count({ where: { action: 'embed.origins', targetId: String(embed.id) } })).toBe(1);
    const settings = await AuditEvent.findAll({ where: { action: 'embed.settings', targetId: String(embed.id) } });
    expect(settings).toHaveLength(1);
    const detail = (typeof settings[0].detail === 'string' ? JSON.parse(settings[0].detail) : settings[0].detail) as Record<string, unknown>;
    expect(detail.changes).toEqual([{ setting: 'theme', from: 'light', to: 'dark' }]);
    expect(detailSummary(detail)).toBe(`Calculator: ${embed.title} · Changed: theme light → dark`);
    expect(actionLabel('embed.settings')).toBe('Calculator settings changed');
    expect(await MixtureModel.count({ where: { workspaceId: ws.workspace.id } })).toBeGreaterThan(0);
  });
});

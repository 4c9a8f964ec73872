/**
 * Plan limits under concurrency: the count and the insert happen in one short write
 * transaction, so a burst of requests cannot slip past a limit together, the slow work
 * (payload checksum, password hashing) runs before the write lock is taken, and the
 * burst does not keep other workspaces' writes waiting until they fail.
 * (Lock hold times as figures: `npm run bench:limits`.)
 */
import { beforeAll, describe, expect, it, vi } from 'vitest';
import { Embed, Invitation, Membership, Subscription, User } from '@/models';
import { insideWriteTurn } from '@/models/db';
import { makeRequest } from '../../helpers/auth';
import { modelWorkspace } from '../embeds/fixtures';

// Slow work records whether it ran inside a write transaction (holding the write lock).
const slowWorkUnderLock: string[] = [];
vi.mock('@/lib/embeds/payload', async (original) => {
  const actual = await original<typeof import('@/lib/embeds/payload')>();
  return {
    ...actual,
    payloadChecksum: (...args: Parameters<typeof actual.payloadChecksum>) => {
      if (insideWriteTurn()) slowWorkUnderLock.push('payloadChecksum');
      return actual.payloadChecksum(...args);
    },
  };
});
vi.mock('bcryptjs', async (original) => {
  const actual = await original<{ default: typeof import('bcryptjs') }>();
  const hash = (...args: Parameters<typeof actual.default.hash>) => {
    if (insideWriteTurn()) slowWorkUnderLock.push('bcrypt.hash');
    return actual.default.hash(...args);
  };
  return { ...actual, default: { ...actual.default, hash } };
});

const { POST: publishRoute } = await import('@/app/api/embeds/route');
const { PATCH: settingsRoute } = await import('@/app/api/embeds/[id]/route');
const { POST: retireRoute } = await import('@/app/api/embeds/[id]/retire/route');
const { POST: inviteRoute } = await import('@/app/api/team/invitations/route');
const { POST: uploadRoute } = await import('@/app/api/datasets/route');
const { acceptInvitation } = await import('@/lib/accounts/invitations');
const { hashToken } = await import('@/lib/accounts/tokens');

const noParams = { params: Promise.resolve({}) };
const idCtx = (id: number) => ({ params: Promise.resolve({ id: String(id) }) });
const BURST = 20;

let small: Awaited<ReturnType<typeof modelWorkspace>>;
let other: Awaited<ReturnType<typeof modelWorkspace>>;
beforeAll(async () => {
  small = await modelWorkspace({ plan: 'sketch' });
  other = await modelWorkspace({ plan: 'lab' });
});

async function publishIn(w: typeof small, title: string) {
  return publishRoute(await makeRequest('/api/embeds', { userId: w.owner.id, workspaceId: w.workspace.id, json: { mixtureModelId: w.model.id, title } }), noParams);
}

function statusCounts(responses: Response[]): Record<number, number> {
  const counts: Record<number, number> = {};
  for (const r of responses) counts[r.status] = (counts[r.status] ?? 0) + 1;
  return counts;
}

describe('a burst of publishes on a one-calculator plan', () => {
  it('creates exactly one calculator; the other 19 get a 402 naming the plan; another workspace writes meanwhile', async () => {
    const theirs = await (await publishIn(other, 'Theirs')).json();
    slowWorkUnderLock.length = 0;

    const burst = Array.from({ length: BURST }, (_, i) => publishIn(small, `Burst ${i}`));
    // A write of another workspace, started while the burst is in flight.
    const elsewhere = makeRequest(`/api/embeds/${theirs.embed.id}`, { method: 'PATCH', userId: other.owner.id, workspaceId: other.workspace.id, json: { title: 'Renamed during the burst' } }).then((r) =>
      settingsRoute(r, idCtx(theirs.embed.id)),
    );
    const responses = await Promise.all(burst);
    expect(statusCounts(responses)).toEqual({ 201: 1, 402: BURST - 1 });
    const refusals = await Promise.all(responses.filter((r) => r.status === 402).map((r) => r.json()));
    for (const body of refusals) {
      expect(body.error.code).toBe('plan_limit');
      expect(body.error.message).toMatch(/^The Sketch plan allows 1 published calculator and this workspace has 1\. Retire one first, or upgrade to Bench/);
    }
    expect(await Embed.count({ where: { workspaceId: small.workspace.id } })).toBe(1);

    // The other workspace's write went through (not a 503 after waiting out the lock).
    const renamed = await elsewhere;
    expect(renamed.status).toBe(200);
    expect((await Embed.findByPk(theirs.embed.id))!.title).toBe('Renamed during the burst');
    // The checksums of all 20 payloads were computed, none while holding the write lock.
    expect(slowWorkUnderLock).toEqual([]);
  });

  it('after a retire frees the place, a second burst again creates exactly one, while another workspace uploads', async () => {
    const live = (await Embed.findOne({ where: { workspaceId: small.workspace.id, status: 'active' } }))!;
    const retired = await retireRoute(await makeRequest(`/api/embeds/${live.id}/retire`, { method: 'POST', userId: small.owner.id, workspaceId: small.workspace.id }), idCtx(live.id));
    expect(retired.status).toBe(200);

    const csv = ['a,b', ...Array.from({ length: 30 }, (_, i) => `${i},${i * 2}`)].join('\n');
    const burst = Array.from({ length: BURST }, (_, i) => publishIn(small, `Again ${i}`));
    const upload = makeRequest('/api/datasets?name=During', { method: 'POST', userId: other.owner.id, workspaceId: other.workspace.id, body: csv, headers: { 'content-type': 'text/csv' } }).then((r) =>
      uploadRoute(r, noParams),
    );
    const [uploaded, ...published] = await Promise.all([upload, ...burst]);
    expect(uploaded.status).toBe(201);
    expect(statusCounts(published)).toEqual({ 201: 1, 402: BURST - 1 });
    expect(await Embed.count({ where: { workspaceId: small.workspace.id, status: 'active' } })).toBe(1);
  });
});

describe('seats under a burst', () => {
  it('a burst of invitations fills the free seats exactly', async () => {
    // Lab: 10 seats; the owner and the member hold two, so eight are free.
    await Subscription.update({ plan: 'lab' }, { where: { workspaceId: small.workspace.id } });
    const invites = await Promise.all(
      Array.from({ length: 14 }, async (_, i) =>
        inviteRoute(await makeRequest('/api/team/invitations', { userId: small.owner.id, workspaceId: small.workspace.id, json: { email: `burst${i}@limits.test`, role: 'member' } }), noParams),
      ),
    );
    expect(statusCounts(invites)).toEqual({ 201: 8, 402: 6 });
    const refusal = await invites.find((r) => r.status === 402)!.json();
    expect(refusal.error.message).toMatch(/The Lab plan includes 10 seats \(owners included\), and all are taken or held by open invitations\./);
    expect(refusal.error.message).toMatch(/Lab is the largest plan/);
    expect(await Invitation.count({ where: { workspaceId: small.workspace.id, acceptedAt: null } })).toBe(8);
  });

  it('on the free plan the seat refusal names the plan that has more seats', async () => {
    const w = await modelWorkspace({ plan: 'sketch' });
    const res = await inviteRoute(await makeRequest('/api/team/invitations', { userId: w.owner.id, workspaceId: w.workspace.id, json: { email: 'third@limits.test', role: 'member' } }), noParams);
    expect(res.status).toBe(402);
    const message = (await res.json()).error.message;
    expect(message).toMatch(/The Sketch plan includes 2 seats/);
    // Bench has two seats too: the next plan with more is Lab.
    expect(message).toMatch(/Upgrade to Lab on the billing page: it includes 10 seats\./);
  });

  it('accepting an invitation as a new person hashes the password before taking the write lock', async () => {
    const token = 'accept-token-for-limits-race-0123456789';
    await Invitation.create({ workspaceId: other.workspace.id, email: 'newcomer@limits.test', role: 'member', tokenHash: hashToken(token), invitedById: other.owner.id, expiresAt: new Date(Date.now() + 86_400_000) });
    slowWorkUnderLock.length = 0;
    const accepted = await acceptInvitation(token, { name: 'Newcomer', password: 'a long and unusual passphrase 42' }, null);
    expect(accepted.newAccount).toBe(true);
    const user = await User.findOne({ where: { email: 'newcomer@limits.test' } });
    expect(await Membership.count({ where: { userId: user!.id, workspaceId: other.workspace.id } })).toBe(1);
    expect(slowWorkUnderLock).toEqual([]);
  });
});

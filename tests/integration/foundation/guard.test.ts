import { beforeAll, describe, expect, it } from 'vitest';
import { Membership, User, Workspace } from '@/models';
import { readActor, requireStaff, requireWorkspace } from '@/lib/auth/guard';
import { AppError } from '@/lib/errors';
import { makeRequest } from '../../helpers/auth';

let owner: User, member: User, staff: User, outsider: User;
let ws: Workspace, other: Workspace;

beforeAll(async () => {
  const mk = (email: string, isStaff = false) => User.create({ email, name: email, passwordHash: 'x', isStaff, emailVerifiedAt: new Date() });
  [owner, member, staff, outsider] = await Promise.all([mk('o@g.test'), mk('m@g.test'), mk('s@g.test', true), mk('x@g.test')]);
  ws = await Workspace.create({ name: 'W', slug: 'w' });
  other = await Workspace.create({ name: 'Other', slug: 'other' });
  await Membership.bulkCreate([
    { userId: owner.id, workspaceId: ws.id, role: 'owner' },
    { userId: member.id, workspaceId: ws.id, role: 'member' },
    { userId: outsider.id, workspaceId: other.id, role: 'owner' },
  ]);
});

const status = async (p: Promise<unknown>) => p.then(() => 200, (e) => (e instanceof AppError ? e.status : 500));

describe('role checks from signed session cookies', () => {
  it('a visitor has no actor; a forged cookie is no actor either', async () => {
    expect(await readActor(await makeRequest('/x'))).toBeNull();
    expect(await readActor(await makeRequest('/x', { headers: { cookie: 'next-auth.session-token=forged' } }))).toBeNull();
    expect(await status(requireWorkspace(await makeRequest('/x')))).toBe(401);
  });

  it('members reach member routes but not owner routes; owners reach both', async () => {
    expect(await status(requireWorkspace(await makeRequest('/x', { userId: member.id }), 'member'))).toBe(200);
    expect(await status(requireWorkspace(await makeRequest('/x', { userId: member.id }), 'owner'))).toBe(403);
    expect(await status(requireWorkspace(await makeRequest('/x', { userId: owner.id }), 'owner'))).toBe(200);
  });

  it('nobody reaches a workspace they do not belong to, whatever id they send', async () => {
    expect(await status(requireWorkspace(await makeRequest('/x', { userId: outsider.id }), 'member', ws.id))).toBe(403);
    const viaCookie = await requireWorkspace(await makeRequest('/x', { userId: outsider.id, workspaceId: ws.id }));
    expect(viaCookie.workspace.id).toBe(other.id);
  });

  it('staff pass staff checks but are not workspace members', async () => {
    expect(await status(requireStaff(await makeRequest('/x', { userId: staff.id })))).toBe(200);
    expect(await status(requireStaff(await makeRequest('/x', { userId: owner.id })))).toBe(403);
    expect(await status(requireWorkspace(await makeRequest('/x', { userId: staff.id })))).toBe(403);
  });

  it('a role change takes effect on the next request', async () => {
    const m = await Membership.findOne({ where: { userId: member.id, workspaceId: ws.id } });
    await m!.update({ role: 'owner' });
    expect(await status(requireWorkspace(await makeRequest('/x', { userId: member.id }), 'owner'))).toBe(200);
    await m!.update({ role: 'member' });
    expect(await status(requireWorkspace(await makeRequest('/x', { userId: member.id }), 'owner'))).toBe(403);
  });
});

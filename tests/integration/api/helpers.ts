import { createApiKey } from '@/lib/auth/api-keys';
import type { ApiKeyScope } from '@/models/api-key-scopes';
import { Membership, Workspace, type User } from '@/models';

/** A key made through lib/auth as the owner would make it in the studio; returns the whole key. */
export async function keyFor(owner: User, workspaceId: number, scopes: ApiKeyScope[], opts: { name?: string; expiresInDays?: number } = {}) {
  const workspace = (await Workspace.findByPk(workspaceId))!;
  const membership = (await Membership.findOne({ where: { userId: owner.id, workspaceId } }))!;
  const { key, secret } = await createApiKey({ user: owner, isStaff: false, workspace, role: membership.role }, { name: opts.name ?? `key ${scopes.join('+')}`, scopes, expiresInDays: opts.expiresInDays });
  return { id: key.id, secret, prefix: key.prefix };
}

/** A Request carrying a bearer key (and nothing else unless asked). */
export function keyRequest(url: string, secret: string | null, opts: { method?: string; json?: unknown; body?: BodyInit; headers?: Record<string, string> } = {}): Request {
  const headers: Record<string, string> = { ...(opts.headers ?? {}) };
  if (secret) headers.authorization = `Bearer ${secret}`;
  let body = opts.body;
  if (opts.json !== undefined) {
    body = JSON.stringify(opts.json);
    headers['content-type'] ??= 'application/json';
  }
  return new Request(new URL(url, 'http://localhost:3000'), { method: opts.method ?? (body !== undefined ? 'POST' : 'GET'), headers, body });
}

export const ctx = <P extends Record<string, string>>(params: P = {} as P) => ({ params: Promise.resolve(params) });

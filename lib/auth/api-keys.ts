import { apiKeyActorLabel, recordAudit } from '@/lib/audit';
import { AppError } from '@/lib/errors';
import { formatDateTime } from '@/lib/format';
import { ApiKey, Workspace } from '@/models';
import { API_KEY_SCOPES, type ApiKeyScope } from '@/models/api-key-scopes';
import { apiKeyCreateSchema, SCOPE_WORDS, type ApiKeyCreate } from './api-key-schemas';
import { generateApiKey, hashApiKey, parseApiKey, sameHash } from './api-key-format';
import type { WorkspaceActor } from './guard';

/**
 * Workspace API keys: the only way into /api/v1. A key reads `pwk_<prefix>_<secret>`:
 * the prefix (10 letters and digits) is public, stored as is and shown in lists; the
 * whole key is hashed (SHA-256, hex) and only the hash is stored, so the secret is shown
 * once, when the key is made. Keys are read from `Authorization: Bearer …` only, never
 * from cookies, so a browser page on any site cannot make a signed-in person's browser
 * act with one. This module is part of lib/auth, the one place that checks roles and scopes.
 *
 * The `score` scope is for batch scoring (not built yet): its route calls
 * `requireApiKey(request, 'score')` like the others, and keys can already carry it.
 */
export { API_KEY_SCOPES, type ApiKeyScope, apiKeyCreateSchema, SCOPE_WORDS, type ApiKeyCreate };
export { generateApiKey, hashApiKey, parseApiKey, sameHash, KEY_PREFIX_LENGTH, KEY_SECRET_LENGTH } from './api-key-format';

/** `last_used_at` is written at most this often per key (every use is still audited). */
export const LAST_USED_RESOLUTION_MS = 60_000;

/** What lists show: never the hash. */
export function describeApiKey(k: ApiKey) {
  return {
    id: k.id,
    name: k.name,
    prefix: `pwk_${k.prefix}`,
    scopes: k.scopes,
    expiresAt: k.expiresAt,
    lastUsedAt: k.lastUsedAt,
    revokedAt: k.revokedAt,
    createdAt: k.createdAt,
  };
}
export type ApiKeyView = ReturnType<typeof describeApiKey>;

function assertOwner(actor: WorkspaceActor) {
  if (actor.role !== 'owner') throw new AppError('forbidden', 'Only a workspace owner may manage API keys.');
}

/** Owners only. The answer carries the whole key: the one time it is ever shown. */
export async function createApiKey(actor: WorkspaceActor, input: ApiKeyCreate, request?: Request): Promise<{ key: ApiKeyView; secret: string }> {
  assertOwner(actor);
  const { key, prefix, secretHash } = generateApiKey();
  const expiresAt = input.expiresInDays ? new Date(Date.now() + input.expiresInDays * 86_400_000) : null;
  const row = await ApiKey.create({ workspaceId: actor.workspace.id, name: input.name, prefix, secretHash, scopes: [...input.scopes], expiresAt, createdById: actor.user.id });
  await recordAudit({ action: 'api_key.create', actor: actor.user, workspaceId: actor.workspace.id, targetType: 'api_key', targetId: row.id, detail: { name: row.name, scopes: row.scopes, expiresAt: expiresAt?.toISOString() ?? null }, request });
  return { key: describeApiKey(row), secret: key };
}

export async function listApiKeys(actor: WorkspaceActor): Promise<ApiKeyView[]> {
  assertOwner(actor);
  const rows = await ApiKey.findAll({ where: { workspaceId: actor.workspace.id }, order: [['createdAt', 'DESC'], ['id', 'DESC']] });
  return rows.map(describeApiKey);
}

/** Revoke at once; a revoked key answers 401 from its next use. Revoking twice is harmless. */
export async function revokeApiKey(actor: WorkspaceActor, id: number, request?: Request): Promise<ApiKeyView> {
  assertOwner(actor);
  const row = await ApiKey.findOne({ where: { id, workspaceId: actor.workspace.id } });
  if (!row) throw new AppError('not_found', 'There is no such API key in this workspace.');
  if (!row.revokedAt) {
    await row.update({ revokedAt: new Date() });
    await recordAudit({ action: 'api_key.revoke', actor: actor.user, workspaceId: actor.workspace.id, targetType: 'api_key', targetId: row.id, detail: { name: row.name }, request });
  }
  return describeApiKey(row);
}

/** Who acts when a key calls: the key itself, for its workspace (its creator is not the actor). */
export interface KeyActor {
  workspace: Workspace;
  key: ApiKey;
  scopes: ApiKeyScope[];
}

const unauthenticated = (message: string) => new AppError('unauthenticated', message, { headers: { 'WWW-Authenticate': 'Bearer realm="partwise"' } });

function bearerOf(request: Request): string | null {
  const header = request.headers.get('authorization');
  if (!header) return null;
  const m = /^Bearer[ ]+(\S+)\s*$/i.exec(header);
  return m ? m[1] : '';
}

/**
 * The key behind an /api/v1 request, with `scope` among its scopes. Reads only the
 * Authorization header: a session cookie alone gets 401. Unknown, revoked and expired
 * keys get 401 (the words say which; a key of another workspace is never named), a key
 * without the scope 403. Every accepted use is audited ('api_key.use'); refusals of a
 * known key too ('api_key.refused'), so an owner can see a pipeline still using an old key.
 */
export async function requireApiKey(request: Request, scope: ApiKeyScope): Promise<KeyActor> {
  const bearer = bearerOf(request);
  if (bearer === null) {
    throw unauthenticated(
      request.headers.get('cookie')
        ? 'This route takes an API key, not a signed-in session: send Authorization: Bearer pwk_… (make a key under Studio → API keys).'
        : 'Send an API key as Authorization: Bearer pwk_… (make one under Studio → API keys).',
    );
  }
  if (bearer === '') throw unauthenticated('The Authorization header must read "Bearer pwk_…".');
  const parts = parseApiKey(bearer);
  if (!parts) throw unauthenticated('This is not a Partwise API key; keys look like pwk_ followed by two groups of letters and digits.');
  const row = await ApiKey.findOne({ where: { prefix: parts.prefix } });
  // The hash is compared even when no key has this prefix, so both answers take alike.
  const matches = sameHash(hashApiKey(bearer), row?.secretHash ?? '0'.repeat(64)) && !!row;
  if (!row || !matches) throw unauthenticated('This API key is not known. Check that it was copied whole, or make a new one.');
  const path = new URL(request.url).pathname;
  const refuse = async (error: AppError, reason: string) => {
    await recordAudit({ action: 'api_key.refused', actorLabel: apiKeyActorLabel(row), workspaceId: row.workspaceId, targetType: 'api_key', targetId: row.id, detail: { reason, method: request.method, path }, request });
    return error;
  };
  const now = new Date();
  if (row.revokedAt) throw await refuse(unauthenticated(`This API key was revoked on ${formatDateTime(row.revokedAt)}; make a new one.`), 'revoked');
  if (row.expiresAt && row.expiresAt.getTime() <= now.getTime()) throw await refuse(unauthenticated(`This API key expired on ${formatDateTime(row.expiresAt)}; make a new one.`), 'expired');
  const workspace = await Workspace.findByPk(row.workspaceId);
  if (!workspace) throw unauthenticated('This API key is not known. Check that it was copied whole, or make a new one.');
  if (workspace.suspendedAt) throw await refuse(new AppError('forbidden', 'This workspace is suspended; its API keys do not work until support restores it.'), 'suspended');
  const scopes = (Array.isArray(row.scopes) ? row.scopes : []).filter((s): s is ApiKeyScope => (API_KEY_SCOPES as readonly string[]).includes(s));
  if (!scopes.includes(scope)) {
    throw await refuse(new AppError('forbidden', `This API key lacks the "${scope}" scope (it has: ${scopes.join(', ') || 'none'}). Make a key with "${scope}" to ${SCOPE_WORDS[scope]}.`), `scope ${scope}`);
  }
  if (!row.lastUsedAt || now.getTime() - row.lastUsedAt.getTime() >= LAST_USED_RESOLUTION_MS) {
    row.lastUsedAt = now;
    await ApiKey.update({ lastUsedAt: now }, { where: { id: row.id } });
  }
  await recordAudit({ action: 'api_key.use', actorLabel: apiKeyActorLabel(row), workspaceId: row.workspaceId, targetType: 'api_key', targetId: row.id, detail: { method: request.method, path, scope }, request });
  return { workspace, key: row, scopes };
}

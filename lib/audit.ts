import { AuditEvent } from '@/models';

/**
 * Append one entry to the audit trail: who did what to which thing, from where.
 * Sensitive actions across the app (sign-in failures, role changes, publish, rotate,
 * disable, enable, plan changes, webhook processing) call this.
 */
export interface AuditEntry {
  action: string;
  actor?: { id: number; email: string } | null;
  /** Who acted when no signed-in person did, e.g. `API key "nightly" (pwk_ab12…)` (see apiKeyActorLabel). */
  actorLabel?: string | null;
  workspaceId?: number | null;
  targetType?: string;
  targetId?: string | number;
  detail?: Record<string, unknown>;
  request?: Request;
}

export function clientAddress(request?: Request): string | null {
  if (!request) return null;
  const forwarded = request.headers.get('x-forwarded-for');
  if (forwarded) return forwarded.split(',')[0].trim().slice(0, 64);
  return request.headers.get('x-real-ip')?.slice(0, 64) ?? null;
}

export async function recordAudit(entry: AuditEntry): Promise<void> {
  await AuditEvent.create({
    action: entry.action,
    actorUserId: entry.actor?.id ?? null,
    actorEmail: entry.actor?.email ?? (entry.actorLabel ? entry.actorLabel.slice(0, 320) : null),
    workspaceId: entry.workspaceId ?? null,
    targetType: entry.targetType ?? null,
    targetId: entry.targetId === undefined ? null : String(entry.targetId),
    detail: entry.detail ?? {},
    address: clientAddress(entry.request),
  });
}

/** How the trail names a workspace API key that acted (stored where a person's e-mail would be). */
export function apiKeyActorLabel(key: { name: string; prefix: string }): string {
  return `API key "${key.name}" (pwk_${key.prefix})`;
}

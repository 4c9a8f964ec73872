import { z } from 'zod';
import type { MixtureModel as EngineModel } from '@/lib/mixture';
import { readStoredVersion, type VersionPayload } from '@/lib/embeds/payload';
import { AppError, type FieldIssue } from '@/lib/errors';
import { Embed, ModelVersion, Workspace, type FieldSetting } from '@/models';
import { rereadScoringSettings, scoringSettings } from './limits';
import { sharedLookup } from './single-flight';

/**
 * What the public routes need about an embed, cached per token for a moment. Status is
 * the one thing that must never be stale in this process: every change (publish,
 * rotate, retire, staff disable, workspace suspension) calls `invalidateEmbed`, and the
 * short TTL bounds staleness for other processes. Versions are immutable, so their
 * parsed, factorised form is cached by id for as long as the process lives (bounded).
 */
export interface ServedEmbed {
  id: number;
  workspaceId: number;
  token: string;
  title: string;
  status: 'active' | 'disabled' | 'retired';
  workspaceSuspended: boolean;
  activeVersionId: number | null;
  allowedOrigins: string[];
  typicalityThreshold: number;
  theme: 'light' | 'dark';
  accentColor: string;
  loadedAt: number;
}

export interface ServedVersion {
  id: number;
  number: number;
  payload: VersionPayload;
  engine: EngineModel;
  valuesSchema: z.ZodType<Record<string, number>>;
}

interface ScoringCaches {
  embeds: Map<string, ServedEmbed>;
  versions: Map<number, ServedVersion>;
  /** Lookups under way, so many answers arriving as an entry expires share one query. */
  loading: Map<string, Promise<ServedEmbed | null>>;
}

const caches = ((globalThis as Record<symbol, unknown>)[Symbol.for('partwise.scoringCaches')] ??= {
  embeds: new Map(),
  versions: new Map(),
  loading: new Map(),
}) as ScoringCaches;
caches.loading ??= new Map();

const MAX_VERSIONS = 256;


/** Forget what this process knows about an embed (by token or id) so the next call reads it fresh. */
export function invalidateEmbed(tokenOrId: string | number): void {
  // A lookup under way may have read the old row; it must not fill the cache.
  caches.loading.clear();
  if (typeof tokenOrId === 'string') caches.embeds.delete(tokenOrId);
  for (const [token, e] of caches.embeds) if (e.id === tokenOrId || e.token === tokenOrId) caches.embeds.delete(token);
}

/** After a workspace is suspended or restored: forget all its embeds at once. */
export function invalidateWorkspace(workspaceId: number): void {
  caches.loading.clear();
  for (const [token, e] of caches.embeds) if (e.workspaceId === workspaceId) caches.embeds.delete(token);
}

export const TOKEN_SHAPE = /^[A-Za-z0-9_-]{10,64}$/;

/** The embed behind a token, or null when no embed has it. */
export async function loadServedEmbed(token: string, now = Date.now()): Promise<ServedEmbed | null> {
  if (!TOKEN_SHAPE.test(token)) return null;
  const hit = caches.embeds.get(token);
  if (hit && now - hit.loadedAt < scoringSettings(now).embedCacheMs) return hit;
  return sharedLookup(caches.loading, token, () => readServedEmbed(token, now), (served) => {
    if (served) caches.embeds.set(token, served);
    else caches.embeds.delete(token);
  });
}

async function readServedEmbed(token: string, now: number): Promise<ServedEmbed | null> {
  const embed = await Embed.findOne({ where: { token } });
  if (!embed) return null;
  const workspace = await Workspace.findByPk(embed.workspaceId, { attributes: ['id', 'suspendedAt'] });
  const served: ServedEmbed = {
    id: embed.id,
    workspaceId: embed.workspaceId,
    token: embed.token,
    title: embed.title,
    status: embed.status,
    workspaceSuspended: !workspace || workspace.suspendedAt !== null,
    activeVersionId: embed.activeVersionId,
    allowedOrigins: Array.isArray(embed.allowedOrigins) ? embed.allowedOrigins : [],
    typicalityThreshold: embed.typicalityThreshold,
    theme: embed.theme === 'dark' ? 'dark' : 'light',
    accentColor: embed.accentColor,
    loadedAt: now,
  };
  return served;
}

export function isServing(embed: ServedEmbed): boolean {
  return embed.status === 'active' && !embed.workspaceSuspended && embed.activeVersionId !== null;
}

export async function loadServedVersion(versionId: number): Promise<ServedVersion> {
  const hit = caches.versions.get(versionId);
  if (hit) return hit;
  const row = await ModelVersion.findByPk(versionId);
  if (!row) throw new AppError('unavailable', 'This calculator is temporarily unavailable.');
  const { payload, engine } = readStoredVersion(row);
  const served: ServedVersion = { id: row.id, number: row.number, payload, engine, valuesSchema: valuesSchema(payload.fields) };
  if (caches.versions.size >= MAX_VERSIONS) caches.versions.delete(caches.versions.keys().next().value as number);
  caches.versions.set(versionId, served);
  return served;
}

function rangeText(f: FieldSetting): string {
  return `between ${f.min} and ${f.max}${f.unit ? ` ${f.unit}` : ''}`;
}

/** The zod schema of one calculator's values: every field, a finite number in its range, nothing else. */
export function valuesSchema(fields: FieldSetting[]): z.ZodType<Record<string, number>> {
  const shape: Record<string, z.ZodType<number>> = {};
  for (const f of fields) {
    const name = f.label || f.feature;
    shape[f.feature] = z
      .number({ error: (iss) => (iss.input === undefined ? `Enter ${name}.` : `${name} must be a number.`) })
      .refine(Number.isFinite, { message: `${name} must be a finite number.`, abort: true })
      .refine((v) => v >= f.min && v <= f.max, { message: `${name} must be ${rangeText(f)}.` });
  }
  return z.strictObject(shape) as unknown as z.ZodType<Record<string, number>>;
}

/** Validate `values` against a version's fields, with one message per field. */
export function parseValues(version: ServedVersion, values: unknown): Record<string, number> {
  if (!values || typeof values !== 'object' || Array.isArray(values)) {
    throw new AppError('invalid_input', 'Send the values as an object of field names and numbers.', { issues: [{ field: 'values', message: 'Send the values as an object of field names and numbers.' }] });
  }
  const result = version.valuesSchema.safeParse(values);
  if (result.success) return result.data;
  const issues: FieldIssue[] = [];
  for (const issue of result.error.issues) {
    if (issue.code === 'unrecognized_keys') {
      for (const key of issue.keys) issues.push({ field: `values.${key}`, message: `"${key.slice(0, 60)}" is not a field of this calculator.` });
    } else {
      issues.push({ field: ['values', ...issue.path.map(String)].join('.'), message: issue.message });
    }
  }
  throw new AppError('invalid_input', issues.map((i) => i.message).join(' '), { issues });
}

/** Test hook: start with empty caches. */
export function clearScoringCaches(): void {
  rereadScoringSettings();
  caches.loading.clear();
  caches.embeds.clear();
  caches.versions.clear();
}

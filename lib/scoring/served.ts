import type { MixtureModel as EngineModel, TypicalitySample } from '@/lib/mixture';
import { readStoredVersion, type VersionPayload } from '@/lib/embeds/payload';
import { AppError, type FieldIssue } from '@/lib/errors';
import { insightLookupFor, type InsightLookup } from '@/lib/insight/counters';
import { Embed, ModelVersion, Workspace, type FieldSetting } from '@/models';
import { rereadScoringSettings, scoringSettings } from './limits';
import { sharedLookup } from './single-flight';
import { announce, onInvalidation } from '@/lib/shared/broadcast';

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
  /** The publisher's choice: a language code, or 'auto' to follow the visitor's browser. */
  language: string;
  /** Answer insight counts this calculator's answers (lib/insight); changing it calls invalidateEmbed. */
  insightEnabled: boolean;
  loadedAt: number;
}

export interface ServedVersion {
  id: number;
  number: number;
  payload: VersionPayload;
  engine: EngineModel;
  /** The version's stored typicality sample, decoded once; null = published before samples (the engine's default sample is used). */
  sample: TypicalitySample | null;
  /** Field position by feature name, so validating values builds nothing per request. */
  fieldIndex: Map<string, number>;
  /** Answer insight's bins of this version, ready for the hot path (lib/insight/counters.ts). */
  insight: InsightLookup;
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
  forgetEmbed(tokenOrId);
  // Every other app instance forgets it too (lib/shared/broadcast), within a second.
  announce({ kind: 'embed', key: tokenOrId });
}

/** This process only: what invalidateEmbed does here, and what it makes every other process do. */
function forgetEmbed(tokenOrId: string | number | null): void {
  // A lookup under way may have read the old row; it must not fill the cache.
  caches.loading.clear();
  if (tokenOrId === null) return void caches.embeds.clear();
  if (typeof tokenOrId === 'string') caches.embeds.delete(tokenOrId);
  for (const [token, e] of caches.embeds) if (e.id === tokenOrId || e.token === tokenOrId) caches.embeds.delete(token);
}

/** After a workspace is suspended or restored: forget all its embeds at once. */
export function invalidateWorkspace(workspaceId: number): void {
  forgetWorkspace(workspaceId);
  announce({ kind: 'workspace', key: workspaceId });
}

function forgetWorkspace(workspaceId: number | null): void {
  caches.loading.clear();
  if (workspaceId === null) return void caches.embeds.clear();
  for (const [token, e] of caches.embeds) if (e.workspaceId === workspaceId) caches.embeds.delete(token);
}

// What other processes announce is cleared here, locally, and not announced again.
onInvalidation('embed', (m) => forgetEmbed(m.key));
onInvalidation('workspace', (m) => forgetWorkspace(typeof m.key === 'number' ? m.key : null));

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
    language: embed.language ?? 'auto',
    insightEnabled: embed.insightEnabled !== false,
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
  const { payload, engine, sample } = readStoredVersion(row);
  const insight = await insightLookupFor({ id: row.id, payload });
  const served: ServedVersion = { id: row.id, number: row.number, payload, engine, sample, fieldIndex: new Map(payload.fields.map((f, j) => [f.feature, j])), insight };
  if (caches.versions.size >= MAX_VERSIONS) caches.versions.delete(caches.versions.keys().next().value as number);
  caches.versions.set(versionId, served);
  return served;
}

function rangeText(f: FieldSetting): string {
  return `between ${f.min} and ${f.max}${f.unit ? ` ${f.unit}` : ''}`;
}

/** A visitor's value for one field: a number, or null when it was left blank. */
export type FieldValue = number | null;

/** What is wrong with one field's value, or null when it is fine (blank is fine for an optional field). */
function fieldProblem(f: FieldSetting, v: unknown): string | null {
  const name = f.label || f.feature;
  if (v === null || v === undefined) return f.optional ? null : `${name} is needed for this calculator.`;
  if (typeof v !== 'number') return `${name} must be a number.`;
  if (!Number.isFinite(v)) return `${name} must be a finite number.`;
  if (v < f.min || v > f.max) return `${name} must be ${rangeText(f)}.`;
  return null;
}

const NOT_AN_OBJECT = 'Send the values as an object of field names and numbers.';
const NOTHING_GIVEN = 'Enter at least one value to get an answer.';

/**
 * Validate `values` against a version's fields, with one message per field, and return
 * them as the row the engine scores (the model's field order, null = not observed). A
 * field left out or sent as null is blank: fine when the publisher made it optional, a
 * 422 naming it when required; a row with no value at all is a 422 too.
 */
export function parseValues(version: ServedVersion, values: unknown): FieldValue[] {
  if (!values || typeof values !== 'object' || Array.isArray(values)) {
    throw new AppError('invalid_input', NOT_AN_OBJECT, { issues: [{ field: 'values', message: NOT_AN_OBJECT }] });
  }
  const given = values as Record<string, unknown>;
  const fields = version.payload.fields;
  const row: FieldValue[] = new Array(fields.length);
  let issues: FieldIssue[] | null = null;
  let observed = 0;
  for (let j = 0; j < fields.length; j++) {
    const f = fields[j];
    const v = Object.hasOwn(given, f.feature) ? given[f.feature] : undefined;
    const problem = fieldProblem(f, v);
    if (problem) (issues ??= []).push({ field: `values.${f.feature}`, message: problem });
    row[j] = typeof v === 'number' ? v : null;
    if (row[j] !== null) observed++;
  }
  for (const key in given) {
    if (Object.hasOwn(given, key) && !version.fieldIndex.has(key)) (issues ??= []).push({ field: `values.${key}`, message: `"${key.slice(0, 60)}" is not a field of this calculator.` });
  }
  if (issues) throw new AppError('invalid_input', issues.map((i) => i.message).join(' '), { issues });
  if (observed === 0) throw new AppError('invalid_input', NOTHING_GIVEN, { issues: [{ field: 'values', message: NOTHING_GIVEN }] });
  return row;
}

/** Test hook: start with empty caches. */
export function clearScoringCaches(): void {
  rereadScoringSettings();
  caches.loading.clear();
  caches.embeds.clear();
  caches.versions.clear();
}

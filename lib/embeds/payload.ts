import { createHash } from 'node:crypto';
import {
  decodeTypicalitySample,
  encodeTypicalitySample,
  MAX_MASK_FIELDS,
  MixtureError,
  parseModelJson,
  typicalitySample,
  type MixtureModel as EngineModel,
  type TypicalitySample,
  type TypicalitySampleJson,
} from '@/lib/mixture';
import { AppError, type FieldIssue } from '@/lib/errors';
import type { ClusterLabel, FieldSetting } from '@/models';

/**
 * The immutable content of a published version: the engine's model JSON plus what
 * the analyst wrote for visitors. Stored as-is in ModelVersion.payload with a
 * SHA-256 of its canonical JSON, so a damaged row is refused instead of served.
 */
export type VersionPayload = {
  model: Record<string, unknown>;
  clusters: ClusterLabel[];
  fields: FieldSetting[];
  caution: string;
  /**
   * Draws from the fitted mixture, made when the version was published, against which a
   * partial answer's typicality is measured (see typicalitySampleFor). Versions published
   * before blank fields existed have none; they use the engine's default sample.
   */
  typicalitySample?: TypicalitySampleJson;
};

/** The sample stored with a new version; null for models too wide for blank fields. */
export function typicalitySampleFor(engine: EngineModel): TypicalitySampleJson | null {
  if (engine.features.length > MAX_MASK_FIELDS) return null;
  return encodeTypicalitySample(typicalitySample(engine));
}

/** JSON with object keys sorted at every level: the same payload always hashes the same. */
export function canonicalJson(value: unknown): string {
  return JSON.stringify(sortKeys(value));
}

function sortKeys(value: unknown): unknown {
  if (Array.isArray(value)) return value.map(sortKeys);
  if (value && typeof value === 'object') {
    const out: Record<string, unknown> = {};
    for (const key of Object.keys(value as object).sort()) {
      const v = (value as Record<string, unknown>)[key];
      if (v !== undefined) out[key] = sortKeys(v);
    }
    return out;
  }
  return value;
}

export function payloadChecksum(payload: VersionPayload): string {
  return createHash('sha256').update(canonicalJson(payload)).digest('hex');
}

const HEX_COLOR = /^#[0-9a-f]{6}$/i;

/**
 * Check a model's labels and field settings against its engine model before publishing;
 * every problem is reported with the path of the setting to fix.
 */
export function validatePayload(payload: VersionPayload): EngineModel {
  let engine: EngineModel;
  try {
    engine = parseModelJson(payload.model);
  } catch (e) {
    if (e instanceof MixtureError) throw new AppError('invalid_input', `The fitted model cannot be published: ${e.message}`, { issues: [{ field: 'model', message: e.message }] });
    throw e;
  }
  const issues: FieldIssue[] = [];
  const k = engine.weights.length;
  const features = engine.features;
  if (!Array.isArray(payload.clusters) || payload.clusters.length !== k) {
    issues.push({ field: 'clusters', message: `Name all ${k} clusters (found ${Array.isArray(payload.clusters) ? payload.clusters.length : 0}).` });
  } else {
    payload.clusters.forEach((c, i) => {
      if (!c || typeof c.label !== 'string' || !c.label.trim()) issues.push({ field: `clusters.${i}.label`, message: `Cluster ${i + 1} needs a label.` });
      else if (c.label.length > 80) issues.push({ field: `clusters.${i}.label`, message: `Cluster ${i + 1}'s label is longer than 80 characters.` });
      if (typeof c?.description !== 'string' || c.description.length > 600) issues.push({ field: `clusters.${i}.description`, message: `Cluster ${i + 1}'s description must be text of at most 600 characters.` });
      if (typeof c?.color !== 'string' || !HEX_COLOR.test(c.color)) issues.push({ field: `clusters.${i}.color`, message: `Cluster ${i + 1}'s colour must look like #3a8a74.` });
    });
  }
  if (!Array.isArray(payload.fields) || payload.fields.length !== features.length) {
    issues.push({ field: 'fields', message: `Set up a field for each of the ${features.length} features (found ${Array.isArray(payload.fields) ? payload.fields.length : 0}).` });
  } else {
    payload.fields.forEach((f, j) => {
      const name = features[j].name;
      if (f?.feature !== name) issues.push({ field: `fields.${j}.feature`, message: `Field ${j + 1} must be the feature "${name}" (the model's order).` });
      if (typeof f?.label !== 'string' || !f.label.trim() || f.label.length > 80) issues.push({ field: `fields.${j}.label`, message: `The field for "${name}" needs a label of at most 80 characters.` });
      if (typeof f?.unit !== 'string' || f.unit.length > 24) issues.push({ field: `fields.${j}.unit`, message: `The unit of "${name}" must be at most 24 characters.` });
      if (typeof f?.help !== 'string' || f.help.length > 400) issues.push({ field: `fields.${j}.help`, message: `The help text of "${name}" must be at most 400 characters.` });
      if (!Number.isFinite(f?.min) || !Number.isFinite(f?.max) || !(f.min < f.max)) issues.push({ field: `fields.${j}.min`, message: `The input range of "${name}" needs a finite minimum below its maximum.` });
      if (f?.optional !== undefined && typeof f.optional !== 'boolean') issues.push({ field: `fields.${j}.optional`, message: `Say whether "${name}" may be left blank (true or false).` });
      else if (f?.optional && features.length > MAX_MASK_FIELDS) issues.push({ field: `fields.${j}.optional`, message: `Fields may be left blank only in models of up to ${MAX_MASK_FIELDS} fields; make "${name}" required.` });
    });
  }
  if (payload.typicalitySample !== undefined) {
    try {
      decodeTypicalitySample(payload.typicalitySample, features.length);
    } catch (e) {
      if (!(e instanceof MixtureError)) throw e;
      issues.push({ field: 'typicalitySample', message: e.message });
    }
  }
  if (typeof payload.caution !== 'string' || payload.caution.length > 2000) issues.push({ field: 'caution', message: 'The caution text must be at most 2000 characters.' });
  if (issues.length) throw new AppError('invalid_input', `This model is not ready to publish: ${issues.map((i) => i.message).join(' ')}`, { issues });
  return engine;
}

type StoredVersion = { id: number; payload: unknown; checksum: string };

/**
 * What is wrong with a stored version, in words for its owner, or null when it is sound.
 * A checksum that does not match means the row was changed or damaged after publishing;
 * a model the engine cannot read would fail every answer.
 */
/** A stored version as the scorer uses it: the payload, the engine model and the decoded sample (null = engine default). */
export type ReadVersion = { payload: VersionPayload; engine: EngineModel; sample: TypicalitySample | null };

function inspectStoredVersion(version: StoredVersion): ReadVersion | { problem: string } {
  let payload: VersionPayload;
  try {
    payload = (typeof version.payload === 'string' ? JSON.parse(version.payload) : version.payload) as VersionPayload;
  } catch {
    return { problem: 'its stored content is not readable JSON' };
  }
  if (!payload || typeof payload !== 'object') return { problem: 'its stored content is missing' };
  if (payloadChecksum(payload) !== version.checksum) return { problem: 'its stored content no longer matches the checksum it was published with' };
  let engine: EngineModel;
  try {
    engine = parseModelJson(payload.model);
  } catch (e) {
    return { problem: `its model cannot be read (${e instanceof MixtureError ? e.message : 'unexpected shape'})` };
  }
  if (payload.typicalitySample === undefined) return { payload, engine, sample: null };
  try {
    return { payload, engine, sample: decodeTypicalitySample(payload.typicalitySample, engine.features.length) };
  } catch (e) {
    return { problem: `its typicality sample cannot be read (${e instanceof MixtureError ? e.message : 'unexpected shape'})` };
  }
}

export function storedPayloadProblem(version: StoredVersion): string | null {
  const inspected = inspectStoredVersion(version);
  return 'problem' in inspected ? inspected.problem : null;
}

/** Read a stored version back, with its engine model; a damaged one is refused (and logged) rather than scored. */
export function readStoredVersion(version: StoredVersion): ReadVersion {
  const inspected = inspectStoredVersion(version);
  if ('problem' in inspected) {
    console.error(`[partwise] model version ${version.id} is damaged (${inspected.problem}); refusing to serve it.`);
    throw new AppError('unavailable', 'This calculator is temporarily unavailable.');
  }
  return inspected;
}

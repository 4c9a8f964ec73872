import { nanoid } from 'nanoid';
import { z } from 'zod';
import { storedText } from '@/lib/http/text';
import { apiKeyActorLabel, recordAudit } from '@/lib/audit';
import { AppError } from '@/lib/errors';
import { invalidateEmbed } from '@/lib/scoring/served';
import { fixInsightBins } from '@/lib/insight/bins';
import { Embed, MixtureModel, ModelVersion, sequelize, type User, type Workspace } from '@/models';
import { assertCanPublish } from '@/lib/billing/limits';
import { accentProblem, DEFAULT_ACCENT, isHexColour } from './contrast';
import { LANGUAGE_SETTINGS } from '@/lib/i18n/languages';
import { allowedOriginsSchema } from './origins';
import { payloadChecksum, storedPayloadProblem, typicalitySampleFor, validatePayload, type VersionPayload } from './payload';

/**
 * Publishing and managing calculators. Each function takes who acts and their
 * workspace (already checked by lib/auth) and loads records by id AND workspace.
 * Who acts is a signed-in person (`user`) or a workspace API key (`apiKey`, with `user`
 * null: the key's creator is not the actor); the audit trail names the one that acted.
 */
export interface Acting {
  user: Pick<User, 'id' | 'email'> | null;
  apiKey?: { id: number; name: string; prefix: string } | null;
  workspace: Pick<Workspace, 'id'>;
  request?: Request;
}

/** The audit fields for whoever acts (lib/audit.ts recordAudit). */
export function auditWho(acting: Pick<Acting, 'user' | 'apiKey'>) {
  return { actor: acting.user, actorLabel: acting.apiKey ? apiKeyActorLabel(acting.apiKey) : null };
}

/** Unguessable: 24 characters of nanoid's URL-safe alphabet (~143 bits). */
export const TOKEN_LENGTH = 24;
export const newToken = () => nanoid(TOKEN_LENGTH);

export const embedSettingsSchema = z
  .object({
    title: storedText('The title').trim().min(1, 'Give the calculator a title.').max(200, 'Keep the title under 200 characters.'),
    allowedOrigins: allowedOriginsSchema,
    theme: z.enum(['light', 'dark'], { error: 'Choose light or dark.' }),
    accentColor: z.string().regex(/^#[0-9a-fA-F]{6}$/, 'Use a colour like #2f6f5e.'),
    typicalityThreshold: z.number({ error: 'Enter a percentile between 0 and 50.' }).min(0, 'The threshold cannot be below 0 %.').max(50, 'Keep the threshold at 50 % or lower.'),
    language: z.enum(LANGUAGE_SETTINGS, { error: "Choose English, German, French, Spanish or 'auto' (follow the visitor's browser)." }),
  })
  .partial()
  .strict();
export type EmbedSettings = z.infer<typeof embedSettingsSchema>;

export const publishSchema = z
  .object({
    mixtureModelId: z.number().int().positive(),
    title: embedSettingsSchema.shape.title,
    allowedOrigins: allowedOriginsSchema.optional(),
  })
  .strict();

/** Publish again (POST …/versions): another model of the workspace, or the calculator's own; served at once unless `activate` is false. */
export const publishVersionSchema = z
  .object({
    mixtureModelId: z.number({ error: 'Give the model id as a number.' }).int().positive().optional(),
    activate: z.boolean({ error: 'Say true or false.' }).optional(),
  })
  .strict();

/** Choose the served version (roll back or forward). */
export const servedVersionSchema = z.object({ versionId: z.number({ error: 'Give the version id as a number.' }).int().positive() }).strict();

export async function findEmbed(acting: Acting, embedId: number): Promise<Embed> {
  const embed = await Embed.findOne({ where: { id: embedId, workspaceId: acting.workspace.id } });
  if (!embed) throw new AppError('not_found', 'There is no such calculator in this workspace.');
  return embed;
}

async function findModel(acting: Acting, mixtureModelId: number): Promise<MixtureModel> {
  const model = await MixtureModel.findOne({ where: { id: mixtureModelId, workspaceId: acting.workspace.id } });
  if (!model) throw new AppError('not_found', 'There is no such model in this workspace.');
  return model;
}

function snapshot(model: MixtureModel): VersionPayload {
  return { model: model.model, clusters: model.clusters, fields: model.fields, caution: model.caution ?? '' };
}

/** The snapshot, checked, with the typicality sample drawn from its model (covered by the checksum like the rest). */
function publishablePayload(model: MixtureModel): VersionPayload {
  const payload = snapshot(model);
  const sample = typicalitySampleFor(validatePayload(payload));
  return sample ? { ...payload, typicalitySample: sample } : payload;
}

/** A new calculator with its first version, serving it at once. */
export async function publishNew(acting: Acting, input: z.infer<typeof publishSchema>): Promise<{ embed: Embed; version: ModelVersion }> {
  const model = await findModel(acting, input.mixtureModelId);
  const payload = publishablePayload(model);
  const checksum = payloadChecksum(payload);
  // Early refusal without the write lock; the check that holds is the one inside.
  await assertCanPublish(acting.workspace.id);
  // Only the count and the inserts run while the write lock is held, so the limit holds
  // exactly under a burst and other workspaces' writes wait a few milliseconds at most.
  const result = await sequelize.transaction(async (transaction) => {
    await assertCanPublish(acting.workspace.id, transaction);
    const embed = await Embed.create(
      { workspaceId: acting.workspace.id, mixtureModelId: model.id, token: newToken(), title: input.title ?? model.name, allowedOrigins: input.allowedOrigins ?? [] },
      { transaction },
    );
    const version = await ModelVersion.create({ embedId: embed.id, mixtureModelId: model.id, createdById: acting.user?.id ?? null, number: 1, payload, checksum }, { transaction });
    await embed.update({ activeVersionId: version.id }, { transaction });
    return { embed, version };
  });
  await fixInsightBins(result.version);
  await audit(acting, 'embed.publish', result.embed, { version: 1, mixtureModelId: model.id });
  return result;
}

/**
 * Publish the model again (or another model of the workspace) as the next version.
 * The new version is served at once unless `activate` is false.
 */
export async function publishVersion(acting: Acting, embedId: number, opts: { mixtureModelId?: number; activate?: boolean } = {}): Promise<{ embed: Embed; version: ModelVersion }> {
  const embed = await findEmbed(acting, embedId);
  if (embed.status === 'retired') throw new AppError('conflict', 'This calculator is retired; publish the model as a new calculator instead.');
  const modelId = opts.mixtureModelId ?? embed.mixtureModelId;
  if (!modelId) throw new AppError('conflict', 'This calculator has no model to publish from; choose one.');
  const model = await findModel(acting, modelId);
  const payload = publishablePayload(model);
  const checksum = payloadChecksum(payload);
  const version = await sequelize.transaction(async (transaction) => {
    const last = (await ModelVersion.max('number', { where: { embedId: embed.id }, transaction })) as number | null;
    const v = await ModelVersion.create(
      { embedId: embed.id, mixtureModelId: model.id, createdById: acting.user?.id ?? null, number: (last ?? 0) + 1, payload, checksum },
      { transaction },
    );
    await embed.update({ mixtureModelId: model.id, ...(opts.activate === false ? {} : { activeVersionId: v.id }) }, { transaction });
    return v;
  });
  await fixInsightBins(version);
  invalidateEmbed(embed.id);
  await audit(acting, 'embed.publish', embed, { version: version.number, mixtureModelId: model.id, activated: opts.activate !== false });
  return { embed, version };
}

/** Serve a chosen version (roll forward or back). */
export async function setActiveVersion(acting: Acting, embedId: number, versionId: number): Promise<Embed> {
  const embed = await findEmbed(acting, embedId);
  if (embed.status === 'retired') throw new AppError('conflict', 'This calculator is retired.');
  const version = await ModelVersion.findOne({ where: { id: versionId, embedId: embed.id } });
  if (!version) throw new AppError('not_found', 'This calculator has no such version.');
  const problem = storedPayloadProblem(version);
  if (problem) throw new AppError('conflict', `Version ${version.number} cannot be served: ${problem}. Serve another version or publish a new one.`);
  const previous = embed.activeVersionId;
  await embed.update({ activeVersionId: version.id });
  invalidateEmbed(embed.id);
  await audit(acting, 'embed.activate_version', embed, { version: version.number, previousVersionId: previous });
  return embed;
}

/** A new token; the old one answers 404 from now on (pages already open stop scoring). */
export async function rotateToken(acting: Acting, embedId: number): Promise<Embed> {
  const embed = await findEmbed(acting, embedId);
  if (embed.status === 'retired') throw new AppError('conflict', 'This calculator is retired.');
  const oldToken = embed.token;
  await embed.update({ token: newToken() });
  invalidateEmbed(oldToken);
  invalidateEmbed(embed.id);
  await audit(acting, 'embed.rotate_token', embed, { previousTokenEnd: oldToken.slice(-4) });
  return embed;
}

/** Stop serving for good; the calculator no longer counts towards the plan. */
export async function retireEmbed(acting: Acting, embedId: number): Promise<Embed> {
  const embed = await findEmbed(acting, embedId);
  if (embed.status === 'retired') return embed;
  await embed.update({ status: 'retired' });
  invalidateEmbed(embed.id);
  await audit(acting, 'embed.retire', embed, {});
  return embed;
}

export async function updateSettings(acting: Acting, embedId: number, settings: EmbedSettings): Promise<Embed> {
  const embed = await findEmbed(acting, embedId);
  if (embed.status === 'retired') throw new AppError('conflict', 'This calculator is retired.');
  const before = { title: embed.title, allowedOrigins: [...embed.allowedOrigins], theme: embed.theme, accentColor: embed.accentColor, typicalityThreshold: embed.typicalityThreshold, language: embed.language };
  assertAccentReadable(settings, before);
  const changed = Object.fromEntries(Object.entries(settings).filter(([, v]) => v !== undefined));
  await embed.update(changed);
  invalidateEmbed(embed.id);
  // The form sends every field; the trail records only what really changed, each under its own name.
  const origins = [...embed.allowedOrigins];
  if (JSON.stringify(origins) !== JSON.stringify(before.allowedOrigins)) {
    await audit(acting, 'embed.origins', embed, { added: origins.filter((o) => !before.allowedOrigins.includes(o)), removed: before.allowedOrigins.filter((o) => !origins.includes(o)) });
  }
  const others = (['title', 'theme', 'accentColor', 'typicalityThreshold', 'language'] as const).filter((k) => k in changed && embed[k] !== before[k]);
  if (others.length) {
    await audit(acting, 'embed.settings', embed, { changes: others.map((k) => ({ setting: k, from: before[k], to: embed[k] })) });
  }
  return embed;
}

/**
 * A new accent or theme must leave the accent readable on that theme (lib/embeds/contrast.ts).
 * Other edits are not held up by a colour saved before the rule existed; the page still
 * shows a passing colour for it (lib/embeds/calculator-page.ts).
 */
function assertAccentReadable(settings: EmbedSettings, stored: { theme: 'light' | 'dark'; accentColor: string }) {
  if (settings.accentColor === undefined && settings.theme === undefined) return;
  const theme = settings.theme ?? stored.theme;
  const accent = settings.accentColor ?? (isHexColour(stored.accentColor) ? stored.accentColor : DEFAULT_ACCENT);
  const problem = accentProblem(accent, theme);
  if (!problem) return;
  const message = settings.accentColor === undefined ? `The saved accent colour does not suit the ${theme} theme. ${problem.message}` : problem.message;
  throw new AppError('invalid_input', message, { issues: [{ field: 'accentColor', message, suggestion: problem.suggestion }] });
}

export async function listEmbeds(acting: Acting): Promise<Embed[]> {
  return Embed.findAll({ where: { workspaceId: acting.workspace.id }, order: [['createdAt', 'DESC'], ['id', 'DESC']] });
}

export async function listVersions(acting: Acting, embedId: number): Promise<ModelVersion[]> {
  const embed = await findEmbed(acting, embedId);
  return ModelVersion.findAll({ where: { embedId: embed.id }, order: [['number', 'DESC']], attributes: ['id', 'embedId', 'mixtureModelId', 'createdById', 'number', 'checksum', 'createdAt'] });
}

/** What the studio shows about an embed (never the model internals). */
export function describeEmbed(embed: Embed) {
  return {
    id: embed.id,
    token: embed.token,
    title: embed.title,
    status: embed.status,
    mixtureModelId: embed.mixtureModelId,
    activeVersionId: embed.activeVersionId,
    allowedOrigins: embed.allowedOrigins,
    theme: embed.theme,
    accentColor: embed.accentColor,
    typicalityThreshold: embed.typicalityThreshold,
    language: embed.language,
    disabledReason: embed.disabledReason,
    createdAt: embed.createdAt,
    updatedAt: embed.updatedAt,
  };
}

export function describeVersion(v: ModelVersion) {
  return { id: v.id, number: v.number, mixtureModelId: v.mixtureModelId, checksum: v.checksum, createdAt: v.createdAt };
}

async function audit(acting: Acting, action: string, embed: Embed, detail: Record<string, unknown>) {
  await recordAudit({ action, ...auditWho(acting), workspaceId: acting.workspace.id, targetType: 'embed', targetId: embed.id, detail: { title: embed.title, ...detail }, request: acting.request });
}

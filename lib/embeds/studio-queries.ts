import 'server-only';
import { Op } from 'sequelize';
import { AppError } from '@/lib/errors';
import { embedMonthlyAnswers } from '@/lib/usage';
import { storedPayloadProblem } from './payload';
import { Embed, MixtureModel, ModelVersion } from '@/models';

/** Read models for the studio's calculator pages (the role check happens in the page). */
export async function calculatorList(workspaceId: number) {
  const [embeds, models] = await Promise.all([
    Embed.findAll({ where: { workspaceId }, order: [['status', 'ASC'], ['createdAt', 'DESC']] }),
    MixtureModel.findAll({ where: { workspaceId }, attributes: ['id', 'name', 'createdAt'], order: [['createdAt', 'DESC']] }),
  ]);
  const versionIds = embeds.map((e) => e.activeVersionId).filter((v): v is number => v !== null);
  const versions = versionIds.length ? await ModelVersion.findAll({ where: { id: { [Op.in]: versionIds } }, attributes: ['id', 'number'] }) : [];
  const numberOf = new Map(versions.map((v) => [v.id, v.number]));
  const rows = await Promise.all(
    embeds.map(async (e) => ({
      id: e.id,
      title: e.title,
      status: e.status,
      servedVersion: e.activeVersionId ? (numberOf.get(e.activeVersionId) ?? null) : null,
      origins: e.allowedOrigins.length,
      answersThisMonth: await embedMonthlyAnswers(e.id),
      createdAt: e.createdAt,
    })),
  );
  return { rows, models: models.map((m) => ({ id: m.id, name: m.name })) };
}

export async function calculatorDetail(workspaceId: number, id: number) {
  const embed = await Embed.findOne({ where: { id, workspaceId } });
  if (!embed) throw new AppError('not_found', 'There is no such calculator in this workspace.');
  const [versions, models, answersThisMonth] = await Promise.all([
    // The payloads are read to check each version the way the scoring route will.
    ModelVersion.findAll({ where: { embedId: embed.id }, attributes: ['id', 'number', 'mixtureModelId', 'payload', 'checksum', 'createdAt'], order: [['number', 'DESC']] }),
    MixtureModel.findAll({ where: { workspaceId }, attributes: ['id', 'name'], order: [['createdAt', 'DESC']] }),
    embedMonthlyAnswers(embed.id),
  ]);
  const modelName = new Map(models.map((m) => [m.id, m.name]));
  return {
    embed: {
      id: embed.id,
      token: embed.token,
      title: embed.title,
      status: embed.status,
      disabledReason: embed.disabledReason,
      activeVersionId: embed.activeVersionId,
      mixtureModelId: embed.mixtureModelId,
      allowedOrigins: embed.allowedOrigins,
      theme: embed.theme,
      accentColor: embed.accentColor,
      typicalityThreshold: embed.typicalityThreshold,
      language: embed.language,
    },
    versions: versions.map((v) => ({ id: v.id, number: v.number, modelName: v.mixtureModelId ? (modelName.get(v.mixtureModelId) ?? 'a removed model') : '—', checksum: v.checksum, createdAt: v.createdAt.toISOString(), problem: storedPayloadProblem(v) })),
    models: models.map((m) => ({ id: m.id, name: m.name })),
    answersThisMonth,
  };
}

export type CalculatorDetail = Awaited<ReturnType<typeof calculatorDetail>>;

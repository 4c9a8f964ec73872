/**
 * Named mixture models: the candidate an analyst keeps from a fit, with cluster labels,
 * colours, calculator field settings and a caution text. The engine's model JSON is
 * copied in, so the model outlives its fit and dataset.
 */
import { z } from 'zod';
import { storedText } from '@/lib/http/text';
import { AppError } from '@/lib/errors';
import { parseWith } from '@/lib/http/handler';
import { MixtureError, parseModelJson, toModelJson } from '@/lib/mixture';
import { Dataset, MixtureModel } from '@/models';
import type { ClusterLabel, FieldSetting } from '@/models';

/** A model's cluster names and calculator fields, for pages and components (which take their types from lib). */
export type { ClusterLabel, FieldSetting };
import { findFit } from './jobs';
import { clusterColor, HEX_COLOR } from './palette';
import { fitResult } from './views';
import { defaultInputRange } from '@/lib/datasets/parse';

export const DEFAULT_CAUTION = 'These percentages describe how similar your values are to groups found in our data. They are not a diagnosis, a rating or a decision about you.';

export const createModelSchema = z.object({
  fitId: z.number().int().positive(),
  /** Position in the fit's ranked candidate list (0 = the BIC winner). */
  candidate: z.number().int().min(0),
  name: storedText('The name').trim().min(1, 'Give the model a name.').max(200, 'Keep the name under 200 characters.'),
  selectionNote: storedText('The note').trim().max(2000, 'Keep the note under 2,000 characters.').default(''),
});

export async function createModelFromFit(workspaceId: number, userId: number | null, input: unknown): Promise<MixtureModel> {
  const body = parseWith(createModelSchema, input, 'model');
  const fit = await findFit(workspaceId, body.fitId);
  const result = fitResult(fit);
  if (fit.status !== 'succeeded' || !result) throw new AppError('conflict', 'This fit has no results yet; wait until it has finished.');
  const candidate = result.candidates[body.candidate];
  if (!candidate) throw new AppError('invalid_input', `The fit has ${result.candidates.length} candidates; there is no candidate ${body.candidate + 1}.`, { issues: [{ field: 'candidate', message: 'no such candidate' }] });
  if (!candidate.model) throw new AppError('invalid_input', `Candidate ${candidate.components} × ${candidate.covariance} could not be fitted (${candidate.error}); choose another.`, { issues: [{ field: 'candidate', message: 'failed candidate' }] });
  if (candidate.rank !== 1 && body.selectionNote === '') {
    throw new AppError('invalid_input', 'This is not the candidate with the lowest BIC; say in a note why you prefer it.', { issues: [{ field: 'selectionNote', message: 'say why you chose this candidate' }] });
  }
  let engineModel;
  try {
    engineModel = parseModelJson(candidate.model);
  } catch (e) {
    // A stored candidate that no longer validates is damaged data, not a server fault: say which part.
    if (e instanceof MixtureError) throw new AppError('invalid_input', `Candidate ${body.candidate + 1}'s stored model cannot be used: ${e.message}`, { issues: [{ field: 'candidate', message: e.message }] });
    throw e;
  }
  engineModel.ranking = result.candidates.map(({ model: _m, trace: _t, ...c }) => c);
  const dataset = await Dataset.findOne({ where: { id: fit.datasetId, workspaceId } });
  const k = engineModel.weights.length;
  const clusters: ClusterLabel[] = Array.from({ length: k }, (_, j) => ({ label: `Cluster ${j + 1}`, description: '', color: clusterColor(j) }));
  const fields: FieldSetting[] = engineModel.features.map((f) => {
    const col = dataset?.columns.find((c) => c.name === f.name);
    const range = defaultInputRange(f.min, f.max);
    return {
      feature: f.name,
      label: col?.displayName || f.name,
      unit: col?.unit ?? f.unit ?? '',
      min: col?.inputMin ?? range.min ?? f.min,
      max: col?.inputMax ?? range.max ?? f.max,
      help: '',
      optional: false,
    };
  });
  return MixtureModel.create({
    workspaceId,
    fitId: fit.id,
    datasetId: fit.datasetId,
    createdById: userId,
    name: body.name,
    model: JSON.parse(toModelJson(engineModel)),
    clusters,
    fields,
    caution: DEFAULT_CAUTION,
    selectionNote: body.selectionNote,
  });
}

const clusterSchema = z.object({
  label: storedText('The label').trim().min(1, 'Give the cluster a label.').max(60, 'Keep the label under 60 characters.'),
  description: storedText('The description').trim().max(160, 'Keep the description to one line (160 characters).'),
  color: z.string().regex(HEX_COLOR, 'Use a colour like #2f6f5e.'),
});
const fieldSchema = z
  .object({
    feature: storedText('The feature').min(1),
    label: storedText('The label').trim().min(1, 'Give the field a label visitors will read.').max(80, 'Keep the label under 80 characters.'),
    unit: storedText('The unit').trim().max(24, 'Keep the unit under 24 characters.'),
    min: z.number({ error: 'Enter a number, like 12 or 12.5.' }).finite('Enter a number, like 12 or 12.5.'),
    max: z.number({ error: 'Enter a number, like 12 or 12.5.' }).finite('Enter a number, like 12 or 12.5.'),
    help: storedText('The help text').trim().max(300, 'Keep the help text under 300 characters.'),
    /** Visitors may leave it blank; absent = required, as for calculators set up before blank fields. */
    optional: z.boolean({ error: 'Choose whether visitors must fill in this field.' }).default(false),
  })
  .refine((f) => f.min < f.max, { message: 'The lowest accepted value must be below the highest.', path: ['max'] });

export const updateModelSchema = z.object({
  name: storedText('The name').trim().min(1, 'Give the model a name.').max(200, 'Keep the name under 200 characters.').optional(),
  clusters: z.array(clusterSchema).optional(),
  fields: z.array(fieldSchema).optional(),
  caution: storedText('The caution').trim().max(600, 'Keep the caution under 600 characters.').optional(),
  selectionNote: storedText('The note').trim().max(2000, 'Keep the note under 2,000 characters.').optional(),
});

export async function findModel(workspaceId: number, id: number): Promise<MixtureModel> {
  const model = await MixtureModel.findOne({ where: { id, workspaceId } });
  if (!model) throw new AppError('not_found', 'No such model in this workspace.');
  return model;
}

export async function updateModel(workspaceId: number, id: number, input: unknown): Promise<MixtureModel> {
  const body = parseWith(updateModelSchema, input, 'model settings');
  const model = await findModel(workspaceId, id);
  const engine = parseModelJson(model.model);
  if (body.clusters) {
    if (body.clusters.length !== engine.weights.length) {
      throw new AppError('invalid_input', `The model has ${engine.weights.length} clusters; send a label for each (got ${body.clusters.length}).`, { issues: [{ field: 'clusters', message: `expected ${engine.weights.length}` }] });
    }
    const seen = new Map<string, number>();
    body.clusters.forEach((c, i) => {
      const key = c.label.toLowerCase();
      if (seen.has(key)) throw new AppError('invalid_input', `Clusters ${seen.get(key)! + 1} and ${i + 1} are both labelled "${c.label}"; visitors could not tell them apart.`, { issues: [{ field: `clusters.${i}.label`, message: `Cluster ${seen.get(key)! + 1} has this label too; visitors could not tell them apart.` }] });
      seen.set(key, i);
    });
    model.clusters = body.clusters;
  }
  if (body.fields) {
    const names = engine.features.map((f) => f.name);
    if (body.fields.length !== names.length || body.fields.some((f, i) => f.feature !== names[i])) {
      throw new AppError('invalid_input', `Send one field per feature, in the model's order: ${names.join(', ')}.`, { issues: [{ field: 'fields', message: 'features do not match the model' }] });
    }
    model.fields = body.fields;
  }
  if (body.name !== undefined) model.name = body.name;
  if (body.caution !== undefined) model.caution = body.caution;
  if (body.selectionNote !== undefined) model.selectionNote = body.selectionNote;
  await model.save();
  return model;
}

export function modelView(model: MixtureModel) {
  return {
    id: model.id,
    name: model.name,
    fitId: model.fitId,
    datasetId: model.datasetId,
    clusters: model.clusters,
    fields: model.fields,
    caution: model.caution,
    selectionNote: model.selectionNote,
    model: model.model,
    createdAt: model.createdAt,
    updatedAt: model.updatedAt,
  };
}

export async function listModels(workspaceId: number) {
  const rows = await MixtureModel.findAll({ where: { workspaceId }, order: [['updatedAt', 'DESC']] });
  return rows.map((m) => {
    const model = m.model as { weights?: number[]; structure?: string; features?: { name: string }[] };
    return { id: m.id, name: m.name, fitId: m.fitId, datasetId: m.datasetId, components: model.weights?.length ?? 0, structure: model.structure ?? '', features: (model.features ?? []).map((f) => f.name), clusters: m.clusters.map((c) => c.label), updatedAt: m.updatedAt };
  });
}

/** The documented model JSON (v1), validated on the way out, and a file name for it. */
export function modelDownload(model: MixtureModel): { body: string; filename: string } {
  // The analyst's names travel with the numbers, so `npm run score` can head its columns with them.
  const clusters = model.clusters.map((c) => ({ label: c.label, description: c.description, color: c.color }));
  const body = toModelJson({ ...parseModelJson(model.model), clusters });
  const slug = model.name.toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-|-$/g, '') || 'model';
  return { body, filename: `${slug}.partwise-model.json` };
}

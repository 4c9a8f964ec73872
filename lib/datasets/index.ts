/**
 * Datasets: upload (validate, check plan limits, store the bytes and the parsed table),
 * per-feature settings, the numeric matrix a fit reads, deletion.
 * Every function takes the workspace id and loads by id AND workspace, so an id from
 * another workspace is simply not found.
 */
import { z } from 'zod';
import { clipText, storedText, textProblem } from '@/lib/http/text';
import { AppError } from '@/lib/errors';
import { parseWith } from '@/lib/http/handler';
import { Dataset, Fit, MixtureModel, sequelize } from '@/models';
import type { DatasetColumn } from '@/models/Dataset';

/** A dataset column's description, for pages and components (which take their types from lib). */
export type { DatasetColumn };
import { decodeCsvBytes, parseCsvText } from './parse';
import { assertUploadBytes, assertUploadRows } from './limits';

export { MIN_DATA_ROWS } from './parse';

export interface UploadInput {
  workspaceId: number;
  /** Null when a workspace API key uploads. */
  userId: number | null;
  bytes: Uint8Array;
  filename: string;
  name?: string;
}

export function datasetNameFrom(filename: string): string {
  const base = filename.replace(/\.(csv|tsv|txt)$/i, '').replace(/[_-]+/g, ' ').trim();
  return clipText(base || 'Untitled table', 200);
}

/** The upload's name and file name are stored text too (see lib/http/text.ts). */
function assertStorableNames(input: UploadInput): void {
  const issues = [
    { field: 'name', what: 'The dataset name', value: input.name },
    { field: 'filename', what: 'The file name', value: input.filename },
  ].flatMap(({ field, what, value }) => {
    const problem = value ? textProblem(value) : null;
    return problem ? [{ field, message: `${what} ${problem}` }] : [];
  });
  if (issues.length) throw new AppError('invalid_input', issues.map((i) => i.message).join(' '), { issues });
}

export async function createDataset(input: UploadInput): Promise<Dataset> {
  assertStorableNames(input);
  await assertUploadBytes(input.workspaceId, input.bytes.length);
  const table = parseCsvText(decodeCsvBytes(input.bytes));
  await assertUploadRows(input.workspaceId, table.completeRows, input.bytes.length);
  const filename = clipText(input.filename || 'pasted.csv', 255);
  return Dataset.create({
    workspaceId: input.workspaceId,
    createdById: input.userId,
    name: clipText(input.name?.trim() || datasetNameFrom(filename), 200),
    originalFilename: filename,
    originalCsv: Buffer.from(input.bytes),
    columns: table.columns,
    cells: table.cells,
    rowCount: table.cells.length,
  });
}

export async function findDataset(workspaceId: number, id: number): Promise<Dataset> {
  const dataset = await Dataset.findOne({ where: { id, workspaceId } });
  if (!dataset) throw new AppError('not_found', 'No such dataset in this workspace.');
  return dataset;
}

/** List view: everything but the bytes and cells. */
export async function listDatasets(workspaceId: number) {
  const rows = await Dataset.findAll({
    where: { workspaceId },
    attributes: ['id', 'number', 'name', 'originalFilename', 'rowCount', 'columns', 'createdAt', 'updatedAt'],
    order: [['createdAt', 'DESC'], ['id', 'DESC']],
  });
  return rows.map((d) => ({
    id: d.id,
    number: d.number,
    name: d.name,
    originalFilename: d.originalFilename,
    rowCount: d.rowCount,
    numericColumns: d.columns.filter((c) => c.kind === 'numeric').length,
    columns: d.columns.length,
    createdAt: d.createdAt,
  }));
}

export function datasetSummary(d: Dataset, previewRows = 20) {
  return {
    id: d.id,
    number: d.number,
    name: d.name,
    originalFilename: d.originalFilename,
    rowCount: d.rowCount,
    bytes: d.originalCsv?.length ?? null,
    columns: d.columns,
    preview: d.cells.slice(0, previewRows),
    createdAt: d.createdAt,
    updatedAt: d.updatedAt,
  };
}

const featureSetting = z
  .object({
    name: storedText('The column name').min(1),
    displayName: storedText('The display name').trim().min(1, 'Give the feature a display name.').max(80, 'Keep the name under 80 characters.'),
    unit: storedText('The unit').trim().max(24, 'Keep the unit under 24 characters.'),
    inputMin: z.number({ error: 'Enter a number, like 12 or 12.5.' }).finite('Enter a number, like 12 or 12.5.'),
    inputMax: z.number({ error: 'Enter a number, like 12 or 12.5.' }).finite('Enter a number, like 12 or 12.5.'),
  })
  .refine((f) => f.inputMin < f.inputMax, { message: 'The lowest accepted value must be below the highest.', path: ['inputMax'] });

export const datasetUpdateSchema = z.object({
  name: storedText('The name').trim().min(1, 'Give the dataset a name.').max(200, 'Keep the name under 200 characters.').optional(),
  features: z.array(featureSetting).max(200).optional(),
});
export type DatasetUpdate = z.infer<typeof datasetUpdateSchema>;

export async function updateDataset(workspaceId: number, id: number, input: DatasetUpdate): Promise<Dataset> {
  const dataset = await findDataset(workspaceId, id);
  const update = parseWith(datasetUpdateSchema, input, 'dataset settings');
  if (update.features) {
    const columns: DatasetColumn[] = dataset.columns.map((c) => ({ ...c }));
    update.features.forEach((f, i) => {
      const col = columns.find((c) => c.name === f.name);
      if (!col) throw new AppError('invalid_input', `There is no column "${f.name}" in this dataset.`, { issues: [{ field: `features.${i}.name`, message: 'unknown column' }] });
      if (col.kind !== 'numeric') throw new AppError('invalid_input', `Column "${f.name}" holds text, not numbers, so it cannot be a feature.`, { issues: [{ field: `features.${i}.name`, message: 'not numeric' }] });
      col.displayName = f.displayName;
      col.unit = f.unit;
      col.inputMin = f.inputMin;
      col.inputMax = f.inputMax;
    });
    dataset.columns = columns;
    dataset.changed('columns', true);
  }
  if (update.name) dataset.name = update.name;
  await dataset.save();
  return dataset;
}

/** Delete a dataset and its fits; named models keep their own copy of the parameters. */
export async function deleteDataset(workspaceId: number, id: number): Promise<void> {
  const dataset = await findDataset(workspaceId, id);
  const running = await Fit.count({ where: { datasetId: dataset.id, status: ['queued', 'running'] } });
  if (running) throw new AppError('conflict', 'A fit of this dataset is still running; cancel it first, then delete the dataset.');
  await sequelize.transaction(async (transaction) => {
    await MixtureModel.update({ datasetId: null, fitId: null }, { where: { datasetId: dataset.id }, transaction });
    const fitIds = (await Fit.findAll({ where: { datasetId: dataset.id }, attributes: ['id'], transaction })).map((f) => f.id);
    if (fitIds.length) await MixtureModel.update({ fitId: null }, { where: { fitId: fitIds }, transaction });
    await Fit.destroy({ where: { datasetId: dataset.id }, transaction });
    await dataset.destroy({ transaction });
  });
}

export { featureMatrix, type FeatureMatrix } from './matrix';

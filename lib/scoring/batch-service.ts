import { z } from 'zod';
import { Embed, Workspace } from '@/models';
import { AppError } from '@/lib/errors';
import { formatCount } from '@/lib/format';
import { discardBody, readBytesCapped, readTextCapped } from '@/lib/http/body';
import { batchBodyBytes, BATCH_ROWS_PER_REQUEST } from '@/lib/plans';
import { recordAnswers } from '@/lib/usage';
import { answersLeft, loadLedger, readyLedger, releaseAnswers, reserveAnswers } from './allowance';
import { batchCsvBlocks, batchJsonBlocks, parseBatchCsv, parseBatchJson, scoreBatch, textStream, type BatchRows } from './batch';
import { loadServedVersion } from './served';

/**
 * A batch of rows scored for a workspace's calculator (the key-authenticated route
 * POST /api/v1/calculators/{id}/scores). One metered answer per row, against the same
 * monthly allowance as visitors' answers: a batch that does not fit in what is left is
 * refused whole, before anything is scored or counted. Visitor insight does not count
 * batches; it describes the calculator's visitors.
 */
export type BatchFormat = 'csv' | 'json';

export interface BatchRequest {
  workspaceId: number;
  embedId: number;
  /** The body as sent, read here with the plan's size cap. */
  body: ReadableStream<Uint8Array> | null;
  contentType: string;
  format: BatchFormat;
}

export interface BatchAnswer {
  stream: ReadableStream<Uint8Array>;
  contentType: string;
  rows: number;
  version: number;
}

export async function scoreBatchRequest(req: BatchRequest): Promise<BatchAnswer> {
  try {
    return await scoreBatchNow(req);
  } catch (error) {
    // Refused before the body was read (no calculator, nothing served): drain it.
    await discardBody(req.body);
    throw error;
  }
}

async function scoreBatchNow(req: BatchRequest): Promise<BatchAnswer> {
  const embed = await Embed.findOne({ where: { id: req.embedId, workspaceId: req.workspaceId } });
  if (!embed) throw new AppError('not_found', 'There is no such calculator in this workspace.');
  const workspace = await Workspace.findByPk(req.workspaceId, { attributes: ['id', 'suspendedAt'] });
  if (embed.status !== 'active' || !workspace || workspace.suspendedAt !== null || embed.activeVersionId === null) {
    throw new AppError('conflict', embed.status === 'disabled' ? 'This calculator is disabled by Partwise support, so it scores nothing.' : 'This calculator serves no version right now, so it scores nothing.');
  }
  const ledger = await loadLedger(req.workspaceId);
  const maxRows = BATCH_ROWS_PER_REQUEST[ledger.plan];
  const maxBytes = batchBodyBytes(ledger.plan);
  const tooLarge = () => new AppError('payload_too_large', `The body is larger than ${formatCount(maxBytes / 1024 / 1024)} MB, the most a batch may send on your plan.`);
  const version = await loadServedVersion(embed.activeVersionId);

  let rows: BatchRows;
  const type = req.contentType.split(';')[0].trim().toLowerCase();
  if (type === 'text/csv') {
    rows = parseBatchCsv(await readTextCapped(req.body, maxBytes, tooLarge), version, maxRows);
  } else if (type === 'application/json') {
    const bytes = await readBytesCapped(req.body, maxBytes, tooLarge);
    let body: unknown;
    try {
      body = JSON.parse(new TextDecoder().decode(bytes));
    } catch {
      throw new AppError('bad_request', 'The body is not valid JSON.');
    }
    rows = parseBatchJson(body, version, maxRows);
  } else {
    throw new AppError('unsupported_media_type', 'Send the rows as text/csv (a header naming the fields) or application/json ({"rows": [...]}).');
  }

  // The check and the reservation in one synchronous step, like a visitor's answer.
  const current = readyLedger(req.workspaceId) ?? ledger;
  if (!reserveAnswers(current, rows.n)) {
    throw new AppError('plan_limit', `This batch has ${formatCount(rows.n)} rows, and ${formatCount(answersLeft(current))} answers are left this month on your plan. Nothing was scored; send fewer rows or move to a larger plan.`);
  }
  let scored;
  try {
    scored = scoreBatch(version, rows, embed.typicalityThreshold);
  } catch (error) {
    releaseAnswers(current, rows.n);
    throw error;
  }
  recordAnswers(embed, rows.n);
  const blocks = req.format === 'csv' ? batchCsvBlocks(version, scored) : batchJsonBlocks(version, scored);
  return { stream: textStream(blocks), contentType: req.format === 'csv' ? 'text/csv; charset=utf-8' : 'application/json; charset=utf-8', rows: rows.n, version: version.number };
}

/** The batch route's query: the answer's format, else the Accept header decides. */
export const batchQuery = z.strictObject({ format: z.enum(['csv', 'json'], { error: 'format must be csv or json.' }).optional() });

/** The answer's format: `?format=` first, then the Accept header; JSON unless only CSV is asked for. */
export function batchFormat(query: BatchFormat | undefined, accept: string | null): BatchFormat {
  if (query) return query;
  return accept && /\btext\/csv\b/i.test(accept) && !/\bapplication\/json\b/i.test(accept) ? 'csv' : 'json';
}

import { AppError } from '@/lib/errors';
import { z } from 'zod';
import { recordAudit } from '@/lib/audit';
import { findEmbed, type Acting } from '@/lib/embeds/service';
import { invalidateEmbed } from '@/lib/scoring/served';
import { InsightAlert, InsightCount, ModelVersion, type StoredFieldBins } from '@/models';
import { ensureInsightBins, geometryOf } from './bins';
import { flushUsage } from '@/lib/usage';
import type { InsightAlertSettings } from './types';

/**
 * What members change about answer insight: the switch per calculator (audited), their
 * own weekly mail, and the CSV of the daily aggregates.
 */
export const insightSwitchSchema = z.object({ enabled: z.boolean({ error: 'Say whether answer insight is on (true) or off (false).' }) }).strict();

export const alertSettingsSchema = z
  .object({
    subscribed: z.boolean({ error: 'Say whether you want the weekly mail (true or false).' }),
    driftThreshold: z
      .number({ error: 'Enter the drift threshold as a number between 0.05 and 1.' })
      .min(0.05, 'The drift threshold must be at least 0.05.')
      .max(1, 'The drift threshold must be at most 1.'),
    unusualShare: z
      .number({ error: 'Enter the unusual share as a number between 0.01 and 1 (0.2 = 20 %).' })
      .min(0.01, 'The unusual share must be at least 0.01 (1 %).')
      .max(1, 'The unusual share must be at most 1 (100 %).'),
  })
  .strict();
export type AlertSettingsInput = z.infer<typeof alertSettingsSchema>;

/** Switch counting on or off for a calculator; takes effect on the next answer in this process. */
export async function setInsightEnabled(acting: Acting, embedId: number, enabled: boolean): Promise<{ enabled: boolean }> {
  const embed = await findEmbed(acting, embedId);
  const before = embed.insightEnabled !== false;
  if (before !== enabled) {
    await embed.update({ insightEnabled: enabled });
    invalidateEmbed(embed.id);
    await recordAudit({ action: 'embed.insight', actor: acting.user, workspaceId: acting.workspace.id, targetType: 'embed', targetId: embed.id, detail: { title: embed.title, changes: [{ setting: 'insightEnabled', from: before, to: enabled }] }, request: acting.request });
  }
  return { enabled };
}

/** The acting member's weekly mail for a calculator. */
export async function setAlertSettings(acting: Acting, embedId: number, input: AlertSettingsInput): Promise<InsightAlertSettings> {
  const user = acting.user;
  if (!user) throw new AppError('forbidden', 'Mail settings belong to a member; sign in to choose yours.');
  const embed = await findEmbed(acting, embedId);
  const values = { subscribed: input.subscribed, driftThreshold: input.driftThreshold, unusualShare: input.unusualShare };
  let row = await InsightAlert.findOne({ where: { embedId: embed.id, userId: user.id } });
  if (row) await row.update(values);
  else row = await InsightAlert.create({ embedId: embed.id, userId: user.id, ...values });
  return { subscribed: row.subscribed, driftThreshold: row.driftThreshold, unusualShare: row.unusualShare, lastSentAt: row.lastSentAt ? new Date(row.lastSentAt).toISOString() : null };
}

export const CSV_HEADER = ['day', 'version_id', 'version_number', 'counter', 'field', 'bin', 'bin_from', 'bin_to', 'count', 'demo'] as const;

/** One CSV cell: quoted when needed; text that a spreadsheet would run as a formula is led by an apostrophe. */
function cell(v: string | number): string {
  let s = String(v);
  if (typeof v === 'string' && /^[=+\-@\t\r]/.test(s)) s = `'${s}`;
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

/**
 * The daily aggregates of a calculator as CSV: one row per day × version × counter
 * (counter answers, unusual, with_blanks, group (bin = group index), bin (the field's
 * bin, with its range; open ends blank), blank (field left blank)).
 */
export async function insightCsv(acting: Acting, embedId: number): Promise<{ filename: string; csv: string }> {
  const embed = await findEmbed(acting, embedId);
  await flushUsage();
  const [rows, versions] = await Promise.all([
    InsightCount.findAll({ where: { embedId: embed.id }, order: [['day', 'ASC'], ['versionId', 'ASC'], ['kind', 'ASC'], ['field', 'ASC'], ['bin', 'ASC']], raw: true }),
    ModelVersion.findAll({ where: { embedId: embed.id }, attributes: ['id', 'number'] }),
  ]);
  const numbers = new Map(versions.map((v) => [v.id, v.number]));
  // Every version with counts has its bins (stored now for versions published before insight).
  const bins = new Map<number, StoredFieldBins[]>();
  for (const versionId of new Set(rows.map((r) => r.versionId))) bins.set(versionId, (await ensureInsightBins(versionId)).fields);
  const lines = [CSV_HEADER.join(',')];
  for (const r of rows) {
    let low: string | number = '';
    let high: string | number = '';
    if (r.kind === 'bin') {
      const edges = bins.get(r.versionId)?.find((f) => f.feature === r.field)?.edges;
      if (edges && r.bin >= 0 && r.bin < edges.length - 1) {
        const g = geometryOf(edges);
        if (r.bin > 0) low = edges[r.bin];
        if (r.bin <= g.inner) high = edges[r.bin + 1];
      }
    }
    lines.push([r.day, r.versionId, numbers.get(r.versionId) ?? '', r.kind, r.field, r.kind === 'bin' || r.kind === 'group' ? r.bin : '', low, high, r.count, r.demo ? 1 : 0].map(cell).join(','));
  }
  const slug = embed.title.toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-|-$/g, '').slice(0, 40) || 'calculator';
  return { filename: `insight-${embed.id}-${slug}.csv`, csv: `${lines.join('\r\n')}\r\n` };
}

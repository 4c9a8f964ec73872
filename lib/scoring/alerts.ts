import { QueryTypes, UniqueConstraintError } from 'sequelize';
import { ownerEmails } from '@/lib/billing/limits';
import { enqueueMail } from '@/lib/mail';
import { answersPausedMail, appLink, calculatorBurstMail } from '@/lib/mail/templates';
import { ANSWER_GRACE, getPlan, type BurstLimit } from '@/lib/plans';
import { Workspace, sequelize } from '@/models';
import type { AnswerLedger } from './allowance';

/**
 * Telling the owner when fair-use limits act: a calculator's burst refusal (once per
 * calculator per UTC clock hour) and the month's pause line (once per month). Each is a
 * row in usage_alerts, the table of the monthly 80 % / 100 % alerts, claimed by a unique
 * index so several processes or bundles send one mail; the studio's billing page lists
 * them. Sending runs beside the answer (a refusal never waits for mail).
 */

// Windows already reported (or being reported) by this process, so refusals skip the insert.
const noted = ((globalThis as Record<symbol, unknown>)[Symbol.for('partwise.scoringAlertsNoted')] ??= new Set<string>()) as Set<string>;

const WINDOW_TEXT: Record<BurstLimit['window'], string> = { minute: 'a minute', hour: 'an hour', day: 'a day' };
const WINDOW_MINUTES: Record<BurstLimit['window'], number> = { minute: 1, hour: 60, day: 1440 };

/** The pause line as a whole percent of the monthly limit (the threshold its alert row carries). */
export const PAUSE_ALERT_THRESHOLD = Math.round((1 + ANSWER_GRACE) * 100);

async function claim(row: { kind: 'allowance' | 'burst'; workspaceId: number; embedId: number | null; period: string; threshold: number; used: number; limit: number }): Promise<boolean> {
  try {
    await sequelize.query('INSERT INTO usage_alerts (workspace_id, kind, embed_id, period, threshold, used, answer_limit, created_at) VALUES (?, ?, ?, ?, ?, ?, ?, ?)', {
      replacements: [row.workspaceId, row.kind, row.embedId, row.period, row.threshold, row.used, row.limit, new Date().toISOString()],
      type: QueryTypes.INSERT,
    });
    return true;
  } catch (e) {
    if (e instanceof UniqueConstraintError) return false;
    throw e;
  }
}

function once(key: string, send: () => Promise<void>): void {
  if (noted.has(key)) return;
  if (noted.size > 10_000) noted.clear();
  noted.add(key);
  send().catch((e) => {
    // Not reported: let a later refusal try again.
    noted.delete(key);
    console.error('[partwise] scoring alert not recorded:', (e as Error).message);
  });
}

/** A calculator's burst limit refused an answer at `at` (the limiter's clock). */
export function noteBurst(embed: { id: number; workspaceId: number; title: string }, ledger: AnswerLedger, limit: BurstLimit, at: number): void {
  const hour = new Date(at).toISOString().slice(0, 13);
  once(`burst:${embed.id}:${hour}`, async () => {
    const claimed = await claim({ kind: 'burst', workspaceId: embed.workspaceId, embedId: embed.id, period: hour, threshold: WINDOW_MINUTES[limit.window], used: ledger.used, limit: limit.answers });
    if (!claimed) return;
    const [workspace, to] = await Promise.all([Workspace.findByPk(embed.workspaceId, { attributes: ['name'] }), ownerEmails(embed.workspaceId)]);
    const plan = getPlan(ledger.plan);
    for (const email of to) {
      await enqueueMail(calculatorBurstMail({ email, workspaceName: workspace?.name ?? 'your workspace', calculatorTitle: embed.title, embedId: embed.id, planName: plan.name, answers: limit.answers, windowText: WINDOW_TEXT[limit.window], link: appLink(`/studio/calculators/${embed.id}`) }));
    }
  });
}

/** The workspace's answers reached the pause line (the last place was taken, or a refusal found it taken). */
export function notePaused(ledger: AnswerLedger): void {
  if (ledger.pauseNoted) return;
  ledger.pauseNoted = true;
  once(`pause:${ledger.workspaceId}:${ledger.period}:${ledger.pauseAt}`, async () => {
    const claimed = await claim({ kind: 'allowance', workspaceId: ledger.workspaceId, embedId: null, period: ledger.period, threshold: PAUSE_ALERT_THRESHOLD, used: ledger.used, limit: ledger.limit });
    if (!claimed) return;
    const [workspace, to] = await Promise.all([Workspace.findByPk(ledger.workspaceId, { attributes: ['name'] }), ownerEmails(ledger.workspaceId)]);
    const plan = getPlan(ledger.plan);
    for (const email of to) {
      await enqueueMail(answersPausedMail({ email, workspaceName: workspace?.name ?? 'your workspace', planName: plan.name, pauseAt: ledger.pauseAt, period: ledger.period, link: appLink('/studio/billing') }));
    }
  });
}

export interface ScoringAlert {
  kind: 'allowance' | 'burst';
  at: string;
  period: string;
  /** allowance: percent of the monthly limit (80, 100, or the pause line); burst: the refusing window in minutes. */
  threshold: number;
  used: number;
  /** allowance: the monthly limit; burst: the window's answers. */
  limit: number;
  calculator: { id: number; title: string } | null;
}

/** A workspace's alerts of the last `days` days, newest first (for the studio). */
export async function recentScoringAlerts(workspaceId: number, days = 31, max = 20): Promise<ScoringAlert[]> {
  const since = new Date(Date.now() - days * 86_400_000).toISOString();
  const rows = await sequelize.query<{ kind: string; created_at: string; period: string; threshold: number; used: number; answer_limit: number; embed_id: number | null; title: string | null }>(
    `SELECT a.kind, a.created_at, a.period, a.threshold, a.used, a.answer_limit, a.embed_id, e.title
       FROM usage_alerts a LEFT JOIN embeds e ON e.id = a.embed_id
      WHERE a.workspace_id = ? AND a.created_at >= ?
      ORDER BY a.created_at DESC, a.id DESC LIMIT ?`,
    { replacements: [workspaceId, since, max], type: QueryTypes.SELECT },
  );
  return rows.map((r) => ({
    kind: r.kind === 'burst' ? 'burst' : 'allowance',
    at: new Date(r.created_at).toISOString(),
    period: r.period,
    threshold: Number(r.threshold),
    used: Number(r.used),
    limit: Number(r.answer_limit),
    calculator: r.embed_id !== null ? { id: Number(r.embed_id), title: r.title ?? 'A removed calculator' } : null,
  }));
}

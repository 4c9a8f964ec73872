import { Op } from 'sequelize';
import { enqueueMail } from '@/lib/mail';
import { appLink, insightWeeklyMail } from '@/lib/mail/templates';
import { Embed, InsightAlert, Membership, User, Workspace } from '@/models';
import { lastWeek } from './aggregate';

/**
 * The weekly insight mail: each subscribed member hears about a calculator at most once
 * in 7 days, and only when its last 7 days crossed one of their thresholds: the overall
 * drift (the largest field PSI against the training data) or the share of answers
 * flagged unusual. Sending is claimed by a conditional update of last_sent_at, so
 * overlapping sweeps (several processes, or a sweep run twice) send one mail.
 */
export const ALERT_EVERY_MS = 7 * 86_400_000;

export async function sweepInsightAlerts(now = new Date()): Promise<{ checked: number; sent: number }> {
  const alerts = await InsightAlert.findAll({ where: { subscribed: true }, order: [['embedId', 'ASC'], ['id', 'ASC']] });
  const due = new Date(now.getTime() - ALERT_EVERY_MS);
  let sent = 0;
  const byEmbed = new Map<number, InsightAlert[]>();
  for (const a of alerts) {
    if (a.lastSentAt && new Date(a.lastSentAt) > due) continue;
    byEmbed.set(a.embedId, [...(byEmbed.get(a.embedId) ?? []), a]);
  }
  for (const [embedId, list] of byEmbed) {
    const embed = await Embed.findByPk(embedId);
    if (!embed || embed.status !== 'active' || embed.insightEnabled === false) continue;
    const week = await lastWeek(embed, now);
    if (!week || week.answers === 0) continue;
    const unusualShare = week.unusual / week.answers;
    const workspace = await Workspace.findByPk(embed.workspaceId, { attributes: ['id', 'name'] });
    for (const alert of list) {
      const drifted = week.drift.psi !== null && week.drift.psi >= alert.driftThreshold;
      if (!drifted && unusualShare < alert.unusualShare) continue;
      // Still a member of the calculator's workspace?
      if (!(await Membership.findOne({ where: { userId: alert.userId, workspaceId: embed.workspaceId } }))) continue;
      const user = await User.findByPk(alert.userId, { attributes: ['id', 'email'] });
      if (!user) continue;
      const [claimed] = await InsightAlert.update(
        { lastSentAt: now },
        { where: { id: alert.id, subscribed: true, [Op.or]: [{ lastSentAt: null }, { lastSentAt: { [Op.lte]: due } }] } },
      );
      if (claimed !== 1) continue;
      await enqueueMail(
        insightWeeklyMail({
          email: user.email,
          workspaceName: workspace?.name ?? 'your workspace',
          calculatorTitle: embed.title,
          answers: week.answers,
          drift: week.drift.psi,
          driftBand: week.drift.band,
          driftThreshold: alert.driftThreshold,
          unusualShare,
          unusualThreshold: alert.unusualShare,
          demo: week.demo,
          link: appLink(`/studio/calculators/${embed.id}/insight`),
        }),
      );
      sent++;
    }
  }
  return { checked: alerts.length, sent };
}

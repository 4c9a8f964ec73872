import { z } from 'zod';
import { storedText } from '@/lib/http/text';
import { clientAddress } from '@/lib/audit';
import { AppError } from '@/lib/errors';
import { consumeLimit } from '@/lib/rate-limit';
import { reportLimit } from '@/lib/scoring/limits';
import { AbuseReport, Embed } from '@/models';
import { normalizeOrigin } from './origins';

/** Why a visitor reports a calculator; support reads these with the message. */
export const REPORT_REASONS = {
  misleading: 'It gives misleading or harmful advice',
  impersonation: 'It pretends to be someone it is not',
  offensive: 'Its words or labels are offensive',
  privacy: 'It asks for values it should not',
  other: 'Something else',
} as const;
export type ReportReason = keyof typeof REPORT_REASONS;

export const reportSchema = z
  .object({
    token: storedText('The calculator token').min(10).max(64),
    reason: z.enum(Object.keys(REPORT_REASONS) as [ReportReason, ...ReportReason[]], { error: 'Choose a reason.' }),
    message: storedText('The message').trim().min(10, 'Tell us in a sentence or two what is wrong (at least 10 characters).').max(2000, 'Keep the message under 2000 characters.'),
    email: z.union([z.literal(''), z.email('Enter a valid e-mail address, or leave it empty.').max(320)]).optional(),
    hostOrigin: storedText('The host page address').max(300).optional(),
  })
  .strict();
export type ReportInput = z.infer<typeof reportSchema>;

/** Reports are accepted for any calculator that exists, serving or not (a disabled one may still be framed somewhere). */
export async function requireReportableEmbed(token: string): Promise<Embed> {
  const embed = await Embed.findOne({ where: { token } });
  if (!embed) throw new AppError('not_found', 'There is no calculator at this address.');
  return embed;
}

export async function submitReport(embed: Embed, input: ReportInput, request: Request): Promise<AbuseReport> {
  const address = clientAddress(request);
  const take = await consumeLimit(`report:addr:${address ?? 'unknown'}`, reportLimit());
  if (!take.ok) {
    throw new AppError('rate_limited', `You have sent several reports just now; try again in ${Math.ceil(take.retryAfterSeconds / 60)} min.`, { headers: { 'Retry-After': String(take.retryAfterSeconds) } });
  }
  return AbuseReport.create({
    embedId: embed.id,
    reason: input.reason,
    message: input.message,
    reporterEmail: input.email ? input.email : null,
    reporterAddress: address,
    hostOrigin: input.hostOrigin ? normalizeOrigin(input.hostOrigin) : null,
  });
}

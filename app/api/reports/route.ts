import { requireReportableEmbed, reportSchema, submitReport } from '@/lib/embeds/reports';
import { readJson, route } from '@/lib/http/handler';

/** Public: a visitor reports a calculator; staff read the reports in support. */
export const POST = route(async (request) => {
  const input = await readJson(request, reportSchema, { maxBytes: 8 * 1024 });
  const embed = await requireReportableEmbed(input.token);
  const report = await submitReport(embed, input, request);
  return Response.json({ report: { id: report.id, status: report.status } }, { status: 201 });
}, { origin: 'any' });

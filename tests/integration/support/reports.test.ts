import { beforeAll, describe, expect, it } from 'vitest';
import { POST as reportRoute } from '@/app/api/reports/route';
import { GET as searchRoute } from '@/app/api/support/calculators/route';
import { GET as detailRoute } from '@/app/api/support/calculators/[id]/route';
import { PATCH as reportStatusRoute } from '@/app/api/support/reports/[id]/route';
import type { CalculatorDetail, CalculatorPage } from '@/lib/support';
import { AbuseReport, AuditEvent, type Embed } from '@/models';
import { makeRequest } from '../../helpers/auth';
import { calculator, staffUser, workspaceWithOwner } from './fixtures';

/** Abuse intake is helper 5's public route; support reads what it stores. */
let staffId: number;
let embed: Embed;

async function fileReport(json: unknown, address: string) {
  const res = await reportRoute(await makeRequest('/api/reports', { json, headers: { 'x-forwarded-for': address } }), { params: Promise.resolve({}) });
  return { status: res.status, headers: res.headers, body: await res.json() };
}

async function detail(): Promise<CalculatorDetail> {
  const res = await detailRoute(await makeRequest(`/api/support/calculators/${embed.id}`, { userId: staffId }), { params: Promise.resolve({ id: String(embed.id) }) });
  return (await res.json()).calculator;
}

beforeAll(async () => {
  staffId = (await staffUser()).id;
  const { workspace } = await workspaceWithOwner({ name: 'Harbour Wheelers' });
  embed = await calculator(workspace, { title: 'Harbour groups', token: 'Reported_0123456789abcdefg' });
});

describe('abuse report intake as support sees it', () => {
  it('validates the report and names each bad field', async () => {
    const bad = await fileReport({ token: embed.token, reason: 'boring', message: 'short', email: 'not-an-email' }, '192.0.2.10');
    expect(bad.status).toBe(422);
    expect(bad.body.error.issues.map((i: { field: string }) => i.field).sort()).toEqual(['email', 'message', 'reason']);
    const unknown = await fileReport({ token: 'NoSuchToken_0123456789ab', reason: 'other', message: 'There is no such calculator at all.' }, '192.0.2.10');
    expect(unknown.status).toBe(404);
    expect(await AbuseReport.count()).toBe(0);
  });

  it('stores a valid report, which support then sees with the message and host site', async () => {
    const ok = await fileReport(
      { token: embed.token, reason: 'misleading', message: 'It tells beginners they belong in the race group.', email: 'rider@example.org', hostOrigin: 'https://Copycat.EXAMPLE' },
      '192.0.2.20',
    );
    expect(ok.status).toBe(201);
    const d = await detail();
    expect(d.reports).toEqual([expect.objectContaining({ reason: 'misleading', message: 'It tells beginners they belong in the race group.', reporterEmail: 'rider@example.org', hostOrigin: 'https://copycat.example', status: 'open' })]);
    const res = await searchRoute(await makeRequest('/api/support/calculators?q=copycat.example', { userId: staffId }), { params: Promise.resolve({}) });
    const page = (await res.json()) as CalculatorPage;
    expect(page.rows.map((r) => [r.title, r.openReports])).toEqual([['Harbour groups', 1]]);
  });

  it('rate-limits reports from one address (429 with Retry-After), others still get through', async () => {
    const statuses: number[] = [];
    let last: Awaited<ReturnType<typeof fileReport>> | undefined;
    for (let i = 0; i < 7; i++) {
      last = await fileReport({ token: embed.token, reason: 'other', message: `Report number ${i} from the same network.` }, '192.0.2.30');
      statuses.push(last.status);
    }
    expect(statuses.slice(0, 5)).toEqual([201, 201, 201, 201, 201]);
    expect(statuses.slice(5)).toEqual([429, 429]);
    expect(Number(last!.headers.get('retry-after'))).toBeGreaterThan(0);
    expect((await fileReport({ token: embed.token, reason: 'other', message: 'A different visitor entirely.' }, '192.0.2.31')).status).toBe(201);
    expect(await AbuseReport.count({ where: { embedId: embed.id } })).toBe(7);
  });

  it('lets staff close a report (and open it again), audited; the open count follows', async () => {
    const report = (await AbuseReport.findOne({ where: { embedId: embed.id }, order: [['id', 'ASC']] }))!;
    const patch = async (status: string, userId = staffId) =>
      reportStatusRoute(await makeRequest(`/api/support/reports/${report.id}`, { method: 'PATCH', userId, json: { status } }), { params: Promise.resolve({ id: String(report.id) }) });
    expect((await patch('resolved')).status).toBe(422);
    expect((await patch('closed')).status).toBe(200);
    expect((await detail()).reports.filter((r) => r.status === 'open')).toHaveLength(6);
    expect((await patch('open')).status).toBe(200);
    const actions = (await AuditEvent.findAll({ where: { targetType: 'embed', targetId: String(embed.id) }, order: [['id', 'ASC']] })).map((e) => e.action);
    expect(actions).toEqual(['support.report_closed', 'support.report_reopened']);
    const missing = await reportStatusRoute(await makeRequest('/api/support/reports/9999', { method: 'PATCH', userId: staffId, json: { status: 'closed' } }), { params: Promise.resolve({ id: '9999' }) });
    expect(missing.status).toBe(404);
  });
});

import { beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { makeRequest } from '../../helpers/auth';
import { POST as publishRoute } from '@/app/api/embeds/route';
import { POST as reportRoute } from '@/app/api/reports/route';
import { rateLimitTesting } from '@/lib/rate-limit';
import { AbuseReport } from '@/models';
import { modelWorkspace } from './fixtures';

let token: string;
let embedId: number;
const noCtx = { params: Promise.resolve({}) };
const report = async (json: unknown, ip = '192.0.2.1') => reportRoute(await makeRequest('/api/reports', { json, headers: { 'x-forwarded-for': ip } }), noCtx);

beforeAll(async () => {
  const ws = await modelWorkspace();
  const body = await (await publishRoute(await makeRequest('/api/embeds', { userId: ws.owner.id, json: { mixtureModelId: ws.model.id } }), noCtx)).json();
  token = body.embed.token;
  embedId = body.embed.id;
});
beforeEach(() => rateLimitTesting.clear());

describe('reporting a calculator', () => {
  it('stores a valid report for support, with the normalised host origin', async () => {
    const res = await report({ token, reason: 'misleading', message: 'It tells people to stop seeing a doctor.', email: 'someone@example.org', hostOrigin: 'https://Club.Example' });
    expect(res.status).toBe(201);
    const stored = await AbuseReport.findByPk((await res.json()).report.id);
    expect(stored).toMatchObject({ embedId, reason: 'misleading', status: 'open', reporterEmail: 'someone@example.org', hostOrigin: 'https://club.example', reporterAddress: '192.0.2.1' });
  });

  it('names each bad field and stores nothing', async () => {
    const before = await AbuseReport.count();
    const res = await report({ token, reason: 'boring', message: 'short', email: 'not-an-email' });
    expect(res.status).toBe(422);
    const fields = (await res.json()).error.issues.map((i: { field: string }) => i.field).sort();
    expect(fields).toEqual(['email', 'message', 'reason']);
    expect(await AbuseReport.count()).toBe(before);
    expect((await report({ token: 'NoSuchCalculatorToken_123', reason: 'other', message: 'Something is off here.' })).status).toBe(404);
  });

  it('limits reports per address with 429 and Retry-After', async () => {
    const statuses: number[] = [];
    for (let i = 0; i < 6; i++) statuses.push((await report({ token, reason: 'other', message: `Report number ${i} about this.` }, '192.0.2.50')).status);
    expect(statuses).toEqual([201, 201, 201, 201, 201, 429]);
    const res = await report({ token, reason: 'other', message: 'One more report here.' }, '192.0.2.50');
    expect(Number(res.headers.get('retry-after'))).toBeGreaterThan(0);
  });
});

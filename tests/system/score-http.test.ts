/**
 * The scoring route over real HTTP, where the app server answers it itself (lib/server's
 * fast path): every good and bad request gets the same status, error code and message
 * as the Next route handler gives for the same input, and a made-up X-Forwarded-For
 * cannot dodge the per-address rate limit unless a trusted proxy is configured.
 */
import http from 'node:http';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { prepareDatabase, startApp, type AppProcess } from '../helpers/app-process';

let app: AppProcess | undefined;
let trusting: AppProcess | undefined;
let token = '';
let routePOST: (request: Request, context: { params: Promise<{ token: string }> }) => Promise<Response>;

const good = { avg_speed_kmh: 24.5, weekly_distance_km: 130, climb_per_ride_m: 420 };

beforeAll(async () => {
  const { dir, env } = await prepareDatabase('score-http');
  // The seeded calculator is on the free plan; lift its burst limits (tests/system/scoring-burst-http
  // covers them) so the per-address checks below see only the per-address limit.
  app = await startApp(dir, { ...env, PARTWISE_SCORE_BURST_SCALE: '1000' });
  // The Next route handler, in this process, on the same database.
  process.env.DATABASE_URL = app.databasePath;
  process.env.NEXTAUTH_URL = app.url;
  const { Embed } = await import('@/models');
  token = (await Embed.findOne({ where: { status: 'active' }, order: [['id', 'ASC']] }))!.token;
  routePOST = (await import('@/app/api/score/[token]/route')).POST;
});

afterAll(async () => {
  await app?.stop();
  await trusting?.stop();
});

interface Sent {
  path?: string;
  body?: string;
  headers?: Record<string, string>;
}

interface Answer {
  status: number;
  body: { error?: { code: string; message: string; issues?: { field: string; message: string }[] }; probabilities?: unknown; used?: string[]; unused?: string[] };
  headers: Headers;
}

async function overHttp(base: string, s: Sent): Promise<Answer> {
  const res = await fetch(`${base}${s.path ?? `/api/score/${token}`}`, { method: 'POST', headers: { 'content-type': 'application/json', ...(s.headers ?? {}) }, body: s.body ?? JSON.stringify({ values: good }) });
  return { status: res.status, body: await res.json(), headers: res.headers };
}

async function throughRoute(s: Sent): Promise<Answer> {
  const path = s.path ?? `/api/score/${token}`;
  const request = new Request(new URL(path, app!.url), { method: 'POST', headers: { 'content-type': 'application/json', ...(s.headers ?? {}) }, body: s.body ?? JSON.stringify({ values: good }) });
  const res = await routePOST(request, { params: Promise.resolve({ token: decodeURIComponent(path.split('/').pop()!) }) });
  return { status: res.status, body: await res.json(), headers: res.headers };
}

const cases: { name: string; sent: Sent; status: number }[] = [
  { name: 'good values', sent: {}, status: 200 },
  { name: 'unknown token', sent: { path: '/api/score/NoSuchCalculatorToken_000' }, status: 404 },
  { name: 'malformed token', sent: { path: '/api/score/short' }, status: 404 },
  { name: 'token longer than 64 characters', sent: { path: `/api/score/${'a'.repeat(65)}` }, status: 422 },
  { name: 'wrong content type', sent: { headers: { 'content-type': 'text/plain' } }, status: 415 },
  { name: 'malformed JSON', sent: { body: '{"values": {' }, status: 400 },
  // The seeded demo calculator makes climbing per ride optional (lib/demo/model.ts); the others are required.
  { name: 'missing required field', sent: { body: JSON.stringify({ values: { weekly_distance_km: 130, climb_per_ride_m: 420 } }) }, status: 422 },
  { name: 'required field sent as null', sent: { body: JSON.stringify({ values: { ...good, avg_speed_kmh: null } }) }, status: 422 },
  { name: 'optional field left out', sent: { body: JSON.stringify({ values: { avg_speed_kmh: 24.5, weekly_distance_km: 130 } }) }, status: 200 },
  { name: 'optional field sent as null', sent: { body: JSON.stringify({ values: { ...good, climb_per_ride_m: null } }) }, status: 200 },
  { name: 'no value at all', sent: { body: JSON.stringify({ values: {} }) }, status: 422 },
  { name: 'extra field', sent: { body: JSON.stringify({ values: { ...good, heart_rate: 150 } }) }, status: 422 },
  { name: 'extra top-level key', sent: { body: JSON.stringify({ values: good, admin: true }) }, status: 422 },
  { name: 'out of range', sent: { body: JSON.stringify({ values: { ...good, avg_speed_kmh: 400 } }) }, status: 422 },
  { name: 'wrong type', sent: { body: JSON.stringify({ values: { ...good, avg_speed_kmh: 'fast' } }) }, status: 422 },
  { name: 'values not an object', sent: { body: JSON.stringify({ values: [1, 2, 3] }) }, status: 422 },
  { name: 'oversized body', sent: { body: JSON.stringify({ values: good, pad: 'x'.repeat(5000) }) }, status: 413 },
  { name: 'another website', sent: { headers: { origin: 'https://copycat.example' } }, status: 403 },
  { name: 'our own page', sent: { headers: { origin: 'ORIGIN' } }, status: 200 },
];

describe('the scoring route over HTTP', () => {
  it.each(cases)('$name: same answer as the route handler', async ({ sent, status }) => {
    const s = sent.headers?.origin === 'ORIGIN' ? { ...sent, headers: { origin: app!.url } } : sent;
    const [fast, route] = [await overHttp(app!.url, s), await throughRoute(s)];
    expect(fast.status).toBe(status);
    expect(route.status).toBe(status);
    if (status === 200) {
      expect(fast.body).toEqual(route.body);
      // Every answer carries what it used and why (the demo model has several groups).
      const body = fast.body as { used?: string[]; unused?: string[]; reason?: { logOdds: number; weightTerm: number; fields: { contribution: number }[] } };
      expect([...body.used!, ...body.unused!].sort()).toEqual(Object.keys(good).sort());
      expect(body.reason!.fields.length).toBe(body.used!.length);
      expect(Math.abs(body.reason!.weightTerm + body.reason!.fields.reduce((a, f) => a + f.contribution, 0) - body.reason!.logOdds)).toBeLessThan(1e-9);
    } else {
      expect(fast.body.error).toEqual(route.body.error);
      expect(fast.body.error?.message.length).toBeGreaterThan(10);
    }
    expect(fast.headers.get('cache-control')).toBe('no-store');
    expect(fast.headers.get('x-content-type-options')).toBe('nosniff');
    expect(fast.headers.get('content-type')).toMatch(/^application\/json/);
  });

  it('refuses a streamed body past the limit even without Content-Length', async () => {
    const url = new URL(`/api/score/${token}`, app!.url);
    const answer = await new Promise<{ status: number; body: string }>((resolve, reject) => {
      const req = http.request(url, { method: 'POST', headers: { 'content-type': 'application/json', 'transfer-encoding': 'chunked' } }, (res) => {
        let body = '';
        res.on('data', (c) => (body += c));
        res.on('end', () => resolve({ status: res.statusCode!, body }));
      });
      req.on('error', reject);
      req.write(`{"values": ${JSON.stringify(good)}, "pad": "`);
      for (let i = 0; i < 10; i++) req.write('y'.repeat(1024));
      req.end('"}');
    });
    expect(answer.status).toBe(413);
    expect(JSON.parse(answer.body).error.code).toBe('payload_too_large');
  });

  it('does not let a made-up X-Forwarded-For dodge the per-address limit', async () => {
    const statuses: number[] = [];
    for (let i = 0; i < 40; i++) statuses.push((await overHttp(app!.url, { headers: { 'x-forwarded-for': `203.0.113.${i}` } })).status);
    expect(statuses.filter((s) => s === 429).length, statuses.join(' ')).toBeGreaterThan(0);
  });

  it('believes X-Forwarded-For behind a proxy the operator declares', async () => {
    // A second server on the same database, told that a proxy of ours sets the header.
    const { PORT: _port, NEXTAUTH_URL: _url, ...env } = app!.env;
    trusting = await startApp(app!.dir, { ...env, PARTWISE_TRUST_PROXY: '1' });
    const statuses: number[] = [];
    for (let i = 0; i < 40; i++) statuses.push((await overHttp(trusting.url, { headers: { 'x-forwarded-for': `198.51.100.${i}, 10.0.0.1` } })).status);
    expect(statuses.every((s) => s === 200), statuses.join(' ')).toBe(true);
  });
});

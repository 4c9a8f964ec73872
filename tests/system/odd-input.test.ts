/**
 * Odd requests over real HTTP to a server started like `npm start`, for the cases only
 * the server and Next's router see: paths with broken percent-encoding, ids that are
 * not plain decimal in page addresses, /api addresses no route has, and methods a
 * route does not answer. APIs answer the app's JSON error (4xx); pages answer the
 * HTML page-not-found; nothing answers 500 or logs a crash.
 */
import http from 'node:http';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_USERS } from '@/lib/demo/accounts';
import { prepareDatabase, startApp, SYSTEM_SECRET, type AppProcess } from '../helpers/app-process';
import { sessionCookie } from '../helpers/auth';

let app: AppProcess | undefined;
let token = '';
const cookies: { member?: string; staff?: string } = {};
const ids = { model: 0, embed: 0, dataset: 0, fit: 0 };

beforeAll(async () => {
  const { dir, env } = await prepareDatabase('odd-input');
  app = await startApp(dir, env);
  // Read the seeded records and sign session cookies in this process, on the same database and secret.
  process.env.DATABASE_URL = app.databasePath;
  process.env.NEXTAUTH_URL = app.url;
  process.env.NEXTAUTH_SECRET = SYSTEM_SECRET;
  const { Dataset, Embed, Fit, MixtureModel, User } = await import('@/models');
  const embed = (await Embed.findOne({ where: { status: 'active' }, order: [['id', 'ASC']] }))!;
  token = embed.token;
  ids.embed = embed.id;
  ids.model = (await MixtureModel.findOne({ where: { workspaceId: embed.workspaceId }, order: [['id', 'ASC']] }))!.id;
  ids.dataset = (await Dataset.findOne({ where: { workspaceId: embed.workspaceId }, order: [['id', 'ASC']] }))!.id;
  ids.fit = (await Fit.findOne({ where: { workspaceId: embed.workspaceId }, order: [['id', 'ASC']] }))!.id;
  const owner = (await User.findOne({ where: { email: DEMO_USERS.owner.email } }))!;
  const staff = (await User.findOne({ where: { email: DEMO_USERS.staff.email } }))!;
  cookies.member = await sessionCookie(owner.id, embed.workspaceId);
  cookies.staff = await sessionCookie(staff.id);
});

afterAll(async () => {
  await app?.stop();
});

interface OddCase {
  name: string;
  method?: string;
  /** Sent byte for byte (fetch would re-encode a broken escape, so the raw path goes over node:http). */
  path: () => string;
  as?: 'member' | 'staff';
  body?: string;
  status: number;
  /** 'json': the app's AppError body with this code; 'html': a page. */
  answer: { json: string } | 'html';
  /** The message must say this (JSON answers). */
  says?: RegExp;
}

const page404 = (name: string, path: () => string, as?: 'member' | 'staff'): OddCase => ({ name, path, as, status: 404, answer: 'html' });

const CASES: OddCase[] = [
  // ---- pages: broken percent-encoding ---------------------------------------------
  page404('calculator page, cut-off UTF-8 escape (%E0%A4%A)', () => '/embed/%E0%A4%A'),
  page404('calculator page, non-hex escape (%ZZ)', () => '/embed/%ZZ'),
  page404('calculator page, escaped lone surrogate (%ED%A0%80)', () => '/embed/%ED%A0%80'),
  page404('calculator page, NUL (%00)', () => '/embed/ab%00cd'),
  page404('studio model page, %ZZ', () => '/studio/models/%ZZ', 'member'),
  page404('studio model page, %ZZ, signed out', () => '/studio/models/%ZZ'),
  page404('studio dataset page, cut-off escape', () => '/studio/datasets/%E0%A4%A', 'member'),
  page404('support calculator page, %ZZ', () => '/support/calculators/%ZZ', 'staff'),
  page404('any page, broken escape with a query', () => '/%C0%AF?x=1'),
  // ---- pages: ids that are not plain decimal ----------------------------------------
  page404('studio model page, hexadecimal id', () => `/studio/models/0x${ids.model.toString(16)}`, 'member'),
  page404('studio calculator page, Infinity', () => '/studio/calculators/Infinity', 'member'),
  page404('studio calculator page, hexadecimal id', () => `/studio/calculators/0x${ids.embed.toString(16)}`, 'member'),
  page404('studio dataset page, 1e400', () => '/studio/datasets/1e400', 'member'),
  page404('studio dataset page, exponent id', () => `/studio/datasets/${ids.dataset}e0`, 'member'),
  page404('studio fit page, trailing .0', () => `/studio/fits/${ids.fit}.0`, 'member'),
  page404('studio fit page, NUL', () => `/studio/fits/${ids.fit}%00`, 'member'),
  page404('support calculator page, hexadecimal id', () => `/support/calculators/0x${ids.embed.toString(16)}`, 'staff'),
  page404('support calculator page, Infinity', () => '/support/calculators/Infinity', 'staff'),
  // ---- pages: NUL in a query the page reads (shown as a refusal or ignored, never a crash) --
  { name: 'support search page, NUL in the search', path: () => '/support?q=river%00side', as: 'staff', status: 200, answer: 'html' },
  { name: 'support audit page, NUL in a filter', path: () => '/support/audit?actor=%00', as: 'staff', status: 200, answer: 'html' },
  { name: 'calculator page, NUL in the host', path: () => `/embed/${token}?host=https%3A%2F%2Fclub.example%00`, status: 200, answer: 'html' },
  // ---- APIs: broken percent-encoding --------------------------------------------------
  { name: 'API id, %ZZ', path: () => '/api/embeds/%ZZ', as: 'member', status: 400, answer: { json: 'bad_request' }, says: /% escape/ },
  { name: 'API id, cut-off escape', path: () => '/api/models/%E0%A4%A', as: 'member', status: 400, answer: { json: 'bad_request' }, says: /% escape/ },
  { name: 'API id, escaped lone surrogate', path: () => '/api/datasets/%ED%A0%80', as: 'member', status: 400, answer: { json: 'bad_request' }, says: /% escape/ },
  { name: 'API, broken escape signed out', path: () => '/api/support/calculators/%ZZ/disable', method: 'POST', status: 400, answer: { json: 'bad_request' } },
  { name: 'scoring (server fast path), broken escape', path: () => '/api/score/%E0%A4%A', method: 'POST', body: '{"values":{}}', status: 400, answer: { json: 'bad_request' }, says: /% escape/ },
  // ---- APIs: ids that are not plain decimal, NUL in a filter -------------------------
  { name: 'API id, hexadecimal', path: () => `/api/embeds/0x${ids.embed.toString(16)}`, as: 'member', status: 422, answer: { json: 'invalid_input' }, says: /written in digits/ },
  { name: 'API id, Infinity', path: () => '/api/models/Infinity', as: 'member', status: 422, answer: { json: 'invalid_input' }, says: /written in digits/ },
  { name: 'API id, 1e400', path: () => '/api/fits/1e400', as: 'member', status: 422, answer: { json: 'invalid_input' }, says: /written in digits/ },
  { name: 'API id, NUL', path: () => `/api/datasets/${ids.dataset}%00`, as: 'member', status: 422, answer: { json: 'invalid_input' }, says: /written in digits/ },
  { name: 'scoring (server fast path), NUL in the token', path: () => `/api/score/${token.slice(0, 10)}%00${token.slice(11)}`, method: 'POST', body: '{"values":{}}', status: 404, answer: { json: 'not_found' } },
  { name: 'support search, NUL', path: () => '/api/support/calculators?q=river%00side', as: 'staff', status: 422, answer: { json: 'invalid_input' }, says: /NUL/ },
  { name: 'support audit filter, NUL', path: () => '/api/support/audit?actor=%00', as: 'staff', status: 422, answer: { json: 'invalid_input' }, says: /NUL/ },
  // ---- APIs: addresses no route has -----------------------------------------------------
  { name: 'unknown API path', path: () => '/api/no-such-thing', status: 404, answer: { json: 'not_found' }, says: /no API at this address/ },
  { name: 'unknown API path, POST', path: () => '/api/embeds/1/no-such-action', method: 'POST', body: '{}', status: 404, answer: { json: 'not_found' } },
  { name: 'unknown API path, DELETE /api', path: () => '/api', method: 'DELETE', status: 404, answer: { json: 'not_found' } },
  { name: 'unknown API path, deep, signed in', path: () => '/api/a/b/c/d', method: 'PATCH', body: '{}', as: 'member', status: 404, answer: { json: 'not_found' } },
  // ---- APIs: methods a route does not answer ---------------------------------------------
  { name: 'PUT on a GET-only route', path: () => '/api/health', method: 'PUT', body: '{}', status: 405, answer: { json: 'method_not_allowed' }, says: /does not answer PUT/ },
  { name: 'DELETE on a POST-only route', path: () => '/api/reports', method: 'DELETE', status: 405, answer: { json: 'method_not_allowed' }, says: /does not answer DELETE/ },
  { name: 'GET on the scoring route', path: () => `/api/score/${token}`, status: 405, answer: { json: 'method_not_allowed' } },
  { name: 'POST on an id route without POST', path: () => `/api/models/${ids.model}`, method: 'POST', body: '{}', as: 'member', status: 405, answer: { json: 'method_not_allowed' } },
  { name: 'a method no route answers (PROPFIND)', path: () => '/api/health', method: 'PROPFIND', status: 400, answer: { json: 'bad_request' }, says: /PROPFIND is not a request method/ },
];

interface Answer {
  status: number;
  headers: http.IncomingHttpHeaders;
  text: string;
}

/** A request with the path exactly as written (no URL parsing or re-encoding on our side). */
function send(c: OddCase): Promise<Answer> {
  const url = new URL(app!.url);
  const headers: Record<string, string> = { accept: c.answer === 'html' ? 'text/html' : 'application/json' };
  if (c.as) headers.cookie = cookies[c.as]!;
  if (c.body !== undefined) {
    headers['content-type'] = 'application/json';
    headers['content-length'] = String(Buffer.byteLength(c.body));
  }
  return new Promise((resolve, reject) => {
    const req = http.request({ host: url.hostname, port: url.port, method: c.method ?? 'GET', path: c.path(), headers }, (res) => {
      let text = '';
      res.setEncoding('utf8');
      res.on('data', (d) => (text += d));
      res.on('end', () => resolve({ status: res.statusCode!, headers: res.headers, text }));
    });
    req.on('error', reject);
    req.end(c.body);
  });
}

describe('odd input over HTTP', () => {
  it('the controls answer normally', async () => {
    expect((await send({ name: 'health', path: () => '/api/health', status: 200, answer: { json: '' } })).status).toBe(200);
    const calculator = await send({ name: 'calculator', path: () => `/embed/${token}`, status: 200, answer: 'html' });
    expect(calculator.status).toBe(200);
    const model = await send({ name: 'model page', path: () => `/studio/models/${ids.model}`, as: 'member', status: 200, answer: 'html' });
    expect(model.status).toBe(200);
  });

  it(`covers ${CASES.length} odd requests`, () => {
    expect(CASES.length).toBeGreaterThanOrEqual(40);
  });

  it.each(CASES)('$name', async (c) => {
    const res = await send(c);
    expect(res.status, res.text.slice(0, 300)).toBe(c.status);
    if (c.answer === 'html') {
      expect(res.headers['content-type']).toMatch(/^text\/html/);
      expect(res.text).toMatch(/<html/i);
      if (c.status === 404) expect(res.text).toMatch(/could not be found|not found|no calculator at this address|Nothing lives at this address/i);
      return;
    }
    expect(res.headers['content-type']).toMatch(/^application\/json/);
    expect(res.headers['x-content-type-options']).toBe('nosniff');
    const body = JSON.parse(res.text) as { error?: { code: string; message: string } };
    expect(body.error?.code).toBe(c.answer.json);
    expect(body.error?.message.length).toBeGreaterThan(10);
    if (c.says) expect(body.error!.message + JSON.stringify(body)).toMatch(c.says);
  });

  it('HEAD on a route without it gets the status without a body', async () => {
    const res = await send({ name: 'head', method: 'HEAD', path: () => '/api/reports', status: 405, answer: { json: '' } });
    expect(res.status).toBe(405);
    expect(res.text).toBe('');
  });

  it('logged no crash for any of them', () => {
    const log = app!.log();
    expect(log).not.toMatch(/request failed|unhandled error|frame policy failed|URIError|DecodeError/);
  });
});

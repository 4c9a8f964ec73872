/**
 * The bad-input catalogue: one table of hostile or broken inputs across every entry
 * point. Each case checks the status, that the message names the problem (field, row
 * or column), and that no table changed (counts and row checksums before and after).
 */
import Stripe from 'stripe';
import { beforeAll, describe, expect, it } from 'vitest';
import { POST as datasetsPOST } from '@/app/api/datasets/route';
import { POST as fitsPOST } from '@/app/api/fits/route';
import { POST as modelsPOST } from '@/app/api/models/route';
import { PATCH as modelPATCH } from '@/app/api/models/[id]/route';
import { POST as scorePOST } from '@/app/api/score/[token]/route';
import { POST as reportsPOST } from '@/app/api/reports/route';
import { POST as webhookPOST } from '@/app/api/webhooks/payments/route';
import { POST as signupPOST } from '@/app/api/account/signup/route';
import { POST as resetPOST } from '@/app/api/account/password/reset/route';
import { POST as forgotPOST } from '@/app/api/account/password/forgot/route';
import { GET as embedGET, PATCH as embedPATCH } from '@/app/api/embeds/[id]/route';
import { GET as modelGET } from '@/app/api/models/[id]/route';
import { DELETE as datasetDELETE, GET as datasetGET, PATCH as datasetPATCH } from '@/app/api/datasets/[id]/route';
import { GET as fitsGET } from '@/app/api/fits/route';
import { GET as fitGET } from '@/app/api/fits/[id]/route';
import { GET as fitReviewGET } from '@/app/api/fits/[id]/review/route';
import { GET as supportSearchGET } from '@/app/api/support/calculators/route';
import { GET as supportAuditGET } from '@/app/api/support/audit/route';
import { POST as supportDisablePOST } from '@/app/api/support/calculators/[id]/disable/route';
import { POST as workspacesPOST } from '@/app/api/workspaces/route';
import { DELETE as unknownApiDELETE, GET as unknownApiGET } from '@/app/api/[[...rest]]/route';
import { payloadChecksum, type VersionPayload } from '@/lib/embeds/payload';
import { membershipChartSpec } from '@/lib/embeds/chart-spec';
import { clearScoringCaches } from '@/lib/scoring';
import { parseCsvText } from '@/lib/datasets/parse';
import { Dataset, Fit, MixtureModel, ModelVersion, Subscription } from '@/models';
import { buildWorld } from '../matrix/world';
import type { World } from '../matrix/types';
import { makeRequest, sessionCookie } from '../../helpers/auth';
import { WORKSPACE_COOKIE } from '@/lib/auth/cookies';
import { parseExpression } from 'vega-expression';
import { changedTables, fingerprint } from './snapshot';

process.env.STRIPE_SECRET_KEY ||= 'sk_test_catalogue';
process.env.STRIPE_WEBHOOK_SECRET ||= 'whsec_catalogue_secret';

let w: World;
/** A 12-row dataset in workspace A with a constant column. */
let smallDatasetId: number;
/** A succeeded fit in A whose stored candidates are damaged in known ways. */
let damagedFitId: number;
let goodModelJson: Record<string, unknown>;

type Ctx = { params: Promise<Record<string, string>> };
// Route handlers differ in their params type; the table calls each with the params it names.
// eslint-disable-next-line @typescript-eslint/no-explicit-any
type Handler = (request: Request, context: any) => Promise<Response> | Response;

interface Case {
  name: string;
  handler: () => Handler;
  params?: () => Record<string, string>;
  /** Builds the request (as the owner of A unless it says otherwise). */
  request: () => Promise<Request>;
  status: number | number[];
  /** The message (or an issue) must mention this. */
  names: RegExp;
  /** Field of one of the issues, when the answer lists issues. */
  field?: string | RegExp;
}

const FEATURES = ['avg_speed_kmh', 'weekly_distance_km', 'climb_per_ride_m'];
const HEADER = FEATURES.join(',');
const goodRows = (n: number) => Array.from({ length: n }, (_, i) => `${20 + (i % 7)},${50 + i * 3},${100 + i * 11}`);

const asOwner = (url: string, opts: Parameters<typeof makeRequest>[1] = {}) => makeRequest(url, { userId: w.users.owner.id, workspaceId: w.workspaceId, ...opts });
const upload = (content: string | Uint8Array, opts: { type?: string; headers?: Record<string, string>; as?: 'outsider' } = {}) => {
  const body = typeof content === 'string' ? new TextEncoder().encode(content) : content;
  const headers = { 'content-type': opts.type ?? 'text/csv', ...(opts.headers ?? {}) };
  if (opts.as === 'outsider') return makeRequest('/api/datasets?filename=t.csv', { userId: w.users.outsider.id, workspaceId: w.otherWorkspaceId, body: body as BodyInit, headers });
  return asOwner('/api/datasets?filename=t.csv', { body: body as BodyInit, headers });
};
const asStaff = (url: string, opts: Parameters<typeof makeRequest>[1] = {}) => makeRequest(url, { userId: w.users.staff.id, ...opts });
const multipart = (form: FormData) => asOwner('/api/datasets', { method: 'POST', body: form });
const fit = (json: Record<string, unknown>) => asOwner('/api/fits', { json: { datasetId: w.datasetId, features: FEATURES, minComponents: 1, maxComponents: 3, ...json } });
const model = (candidate: number, extra: Record<string, unknown> = {}) => asOwner('/api/models', { json: { fitId: damagedFitId, candidate, name: 'From damaged fit', selectionNote: 'catalogue', ...extra } });
const patchModel = (json: unknown) => asOwner(`/api/models/${w.modelId}`, { method: 'PATCH', json });
let visitor = 0;
/** Each scoring/report case comes from its own address so rate limits never decide the answer. */
const publicPost = (url: string, opts: { json?: unknown; body?: string; type?: string } = {}) =>
  makeRequest(url, {
    method: 'POST',
    json: opts.json,
    body: opts.body,
    headers: { 'x-forwarded-for': `203.0.113.${++visitor}`, ...(opts.type ? { 'content-type': opts.type } : {}) },
  });
const score = (values: unknown, extra: Record<string, unknown> = {}) => publicPost(`/api/score/${w.embedToken}`, { json: { values, ...extra } });
const goodValues = { avg_speed_kmh: 24, weekly_distance_km: 120, climb_per_ride_m: 400 };
const report = (json: Record<string, unknown>) => publicPost('/api/reports', { json: { token: w.embedToken, reason: 'misleading', message: 'The labels on this calculator are misleading.', ...json } });
const webhook = (body: string, signature?: string) =>
  makeRequest('/api/webhooks/payments', { method: 'POST', body, headers: { 'content-type': 'application/json', ...(signature ? { 'stripe-signature': signature } : {}) } });
const signed = (body: string) => Stripe.webhooks.generateTestHeaderString({ payload: body, secret: process.env.STRIPE_WEBHOOK_SECRET! });
const signup = (json: Record<string, unknown>) => publicPost('/api/account/signup', { json: { name: 'Robin Rider', email: 'robin@club.test', password: 'a long enough password', workspaceName: 'Club', ...json } });

const scoreCtx = () => ({ token: w.embedToken });

/** NUL and an unpaired surrogate: JSON and URLs carry both; no person types either. */
const NUL = '\u0000';
const LONE = '\ud83d';
const NUL_SAID = /contains a NUL character/;
const LONE_SAID = /unpaired UTF-16 surrogate/;
/** A CSV whose first NUL sits past decodeCsvBytes's 8 KB binary probe, in text column "rider", sheet row 252. */
const lateNulCsv = () =>
  ['rider,avg_speed_kmh,weekly_distance_km,climb_per_ride_m', ...Array.from({ length: 300 }, (_, i) => `${i === 250 ? `rider${NUL}250` : `rider-${String(i).padStart(4, '0')}-of-the-riverside-club`},${20 + (i % 7)},${50 + i},${100 + i * 3}`)].join('\n');

/** A copy of the good model JSON with one change applied. */
function damaged(change: (m: Record<string, any>) => void): Record<string, unknown> {
  const m = structuredClone(goodModelJson) as Record<string, any>;
  change(m);
  return m;
}

const CASES: Case[] = [
  // ---- CSV uploads ------------------------------------------------------------
  { name: 'upload: binary file (PNG bytes)', handler: () => datasetsPOST, request: () => upload(new Uint8Array([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 0x0d, 0x49, 0x48, 0x44, 0x52])), status: 415, names: /binary data.*position 9/ },
  { name: 'upload: empty file', handler: () => datasetsPOST, request: () => upload(''), status: 400, names: /empty/ },
  { name: 'upload: only blank lines', handler: () => datasetsPOST, request: () => upload('\n\n  \n'), status: 400, names: /empty/ },
  { name: 'upload: header only', handler: () => datasetsPOST, request: () => upload(`${HEADER}\n`), status: 400, names: /header row but no data rows/ },
  { name: 'upload: duplicate header names', handler: () => datasetsPOST, request: () => upload(['speed,distance,Speed', ...goodRows(12)].join('\n')), status: 422, names: /Column 3 is named "Speed", the same as column 1/, field: 'column 3' },
  { name: 'upload: blank header name', handler: () => datasetsPOST, request: () => upload(['speed,,climb', ...goodRows(12)].join('\n')), status: 422, names: /Column 2 has no name/, field: 'column 2' },
  { name: 'upload: ragged rows', handler: () => datasetsPOST, request: () => upload([HEADER, ...goodRows(3), '21,40', ...goodRows(8), '1,2,3,4'].join('\n')), status: 422, names: /Row 5 has 2 values but the header has 3 columns.*Row 14 has 4 values/, field: 'row 5' },
  { name: 'upload: non-numeric cells leave too few complete rows', handler: () => datasetsPOST, request: () => upload([HEADER, ...goodRows(12).map((r, i) => (i < 4 ? r.replace(/^\d+/, 'fast') : r))].join('\n')), status: 422, names: /Only 8 rows have a number in every numeric column \(avg_speed_kmh, weekly_distance_km, climb_per_ride_m\)/ },
  { name: 'upload: NaN and Infinity text', handler: () => datasetsPOST, request: () => upload([HEADER, ...goodRows(12).map((r, i) => ([1, 3, 5, 7].includes(i) ? r.replace(/,(\d+)$/, ',Infinity') : i === 0 ? r.replace(/^\d+/, 'NaN') : r))].join('\n')), status: 422, names: /Only 7 rows have a number in every numeric column/ },
  { name: 'upload: no numeric column at all', handler: () => datasetsPOST, request: () => upload(['rider,club', ...Array.from({ length: 12 }, (_, i) => `r${i},north`)].join('\n')), status: 422, names: /No column holds numbers: "rider", "club"/ },
  { name: 'upload: more columns than rows', handler: () => datasetsPOST, request: () => upload([Array.from({ length: 20 }, (_, j) => `c${j}`).join(','), ...Array.from({ length: 4 }, (_, i) => Array.from({ length: 20 }, (_, j) => i * j).join(','))].join('\n')), status: 422, names: /Only 4 rows.*at least 10/ },
  { name: 'upload: over 200 columns', handler: () => datasetsPOST, request: () => upload([Array.from({ length: 201 }, (_, j) => `c${j}`).join(','), Array.from({ length: 201 }, () => 1).join(',')].join('\n')), status: 422, names: /201 columns; at most 200/ },
  { name: 'upload: unclosed quote', handler: () => datasetsPOST, request: () => upload([HEADER, ...goodRows(5), '"21,40,300', ...goodRows(6)].join('\n')), status: 422, names: /quoted value that never closes/, field: /^row \d+$/ },
  { name: 'upload: invalid UTF-8', handler: () => datasetsPOST, request: () => upload(new Uint8Array([...new TextEncoder().encode(`${HEADER}\n20,50,`), 0xc3, 0x28, 0x0a, ...new TextEncoder().encode(goodRows(12).join('\n'))])), status: 415, names: /not UTF-8/ },
  { name: 'upload: wrong content type', handler: () => datasetsPOST, request: () => asOwner('/api/datasets', { json: { csv: HEADER } }), status: 415, names: /CSV file/ },
  { name: 'upload: form without a file', handler: () => datasetsPOST, request: () => { const f = new FormData(); f.set('name', 'nothing'); return multipart(f); }, status: 422, names: /Choose a CSV file/, field: 'file' },
  {
    name: 'upload: 50 MB declared on the Sketch plan is refused unread',
    handler: () => datasetsPOST,
    request: () => upload(new Uint8Array(50 * 1024 * 1024).fill(0x31), { as: 'outsider', headers: { 'content-length': String(50 * 1024 * 1024) } }),
    status: 413,
    names: /Sketch plan accepts uploads up to 2 MB per file/,
  },
  {
    name: 'upload: just over the Sketch limit without a declared length',
    handler: () => datasetsPOST,
    request: () => upload([HEADER, ...goodRows(12)].join('\n').padEnd(2 * 1024 * 1024 + 1, '\n'), { as: 'outsider' }),
    status: [402, 413],
    names: /2 MB/,
  },
  // ---- fit parameters -----------------------------------------------------------
  { name: 'fit: zero components', handler: () => fitsPOST, request: () => fit({ minComponents: 0 }), status: 422, names: /minComponents/, field: 'minComponents' },
  { name: 'fit: components above the row count', handler: () => fitsPOST, request: () => fit({ datasetId: smallDatasetId, features: ['speed', 'distance'], maxComponents: 8 }), status: 422, names: /Only 12 rows.*needs at least 16/, field: 'maxComponents' },
  { name: 'fit: components above the maximum', handler: () => fitsPOST, request: () => fit({ maxComponents: 99 }), status: 422, names: /At most 12 components/, field: 'maxComponents' },
  { name: 'fit: min above max', handler: () => fitsPOST, request: () => fit({ minComponents: 5, maxComponents: 2 }), status: 422, names: /smallest component count/, field: 'maxComponents' },
  { name: 'fit: unknown covariance structure', handler: () => fitsPOST, request: () => fit({ covariances: ['full', 'wobbly'] }), status: 422, names: /covariances\.1/, field: 'covariances.1' },
  { name: 'fit: negative regularisation', handler: () => fitsPOST, request: () => fit({ regCovar: -0.1 }), status: 422, names: /regCovar/, field: 'regCovar' },
  { name: 'fit: huge iteration count', handler: () => fitsPOST, request: () => fit({ maxIter: 1_000_000_000 }), status: 422, names: /maxIter/, field: 'maxIter' },
  { name: 'fit: too many restarts', handler: () => fitsPOST, request: () => fit({ restarts: 500 }), status: 422, names: /restarts/, field: 'restarts' },
  { name: 'fit: unknown feature', handler: () => fitsPOST, request: () => fit({ features: ['avg_speed_kmh', 'heart_rate'] }), status: 422, names: /no column "heart_rate"/, field: 'features.1' },
  { name: 'fit: constant column', handler: () => fitsPOST, request: () => fit({ datasetId: smallDatasetId, features: ['speed', 'club_size'], maxComponents: 2 }), status: 422, names: /"club_size" has the same value \(40\) in every row/, field: 'features.1' },
  { name: 'fit: features listed twice', handler: () => fitsPOST, request: () => fit({ features: ['avg_speed_kmh', 'avg_speed_kmh'] }), status: 422, names: /listed twice/, field: 'features' },
  { name: 'fit: wrong-typed seed', handler: () => fitsPOST, request: () => fit({ seed: 'lucky' }), status: 422, names: /seed/, field: 'seed' },
  { name: 'fit: body is not JSON', handler: () => fitsPOST, request: () => asOwner('/api/fits', { body: '{"datasetId": 1,', headers: { 'content-type': 'application/json' } }), status: 400, names: /not valid JSON/ },
  // ---- model JSON (through model creation from a fit's stored candidate) ----------
  { name: 'model JSON: missing key (means)', handler: () => modelsPOST, request: () => model(0), status: 422, names: /means/, field: 'candidate' },
  { name: 'model JSON: wrong shape (a mean with too few values)', handler: () => modelsPOST, request: () => model(1), status: 422, names: /means\.0 must have 3 values/, field: 'candidate' },
  { name: 'model JSON: non-symmetric covariance', handler: () => modelsPOST, request: () => model(2), status: 422, names: /covariances\.0 is not symmetric/, field: 'candidate' },
  { name: 'model JSON: covariance not positive definite', handler: () => modelsPOST, request: () => model(3), status: 422, names: /covariances\.1/, field: 'candidate' },
  { name: 'model JSON: weights not summing to 1', handler: () => modelsPOST, request: () => model(4), status: 422, names: /weights must sum to 1/, field: 'candidate' },
  { name: 'model: no such candidate', handler: () => modelsPOST, request: () => model(40), status: 422, names: /no candidate 41/, field: 'candidate' },
  // ---- labels and calculator fields ------------------------------------------
  { name: 'labels: wrong number of clusters', handler: () => modelPATCH, params: () => ({ id: String(w.modelId) }), request: () => patchModel({ clusters: [{ label: 'Only one', description: '', color: '#3a8a74' }] }), status: 422, names: /has 3 clusters.*got 1/, field: 'clusters' },
  { name: 'labels: the same label twice', handler: () => modelPATCH, params: () => ({ id: String(w.modelId) }), request: () => patchModel({ clusters: ['Climbers', 'climbers', 'Sprinters'].map((label) => ({ label, description: '', color: '#3a8a74' })) }), status: 422, names: /both labelled "climbers"/, field: 'clusters.1.label' },
  { name: 'labels: colour carrying markup', handler: () => modelPATCH, params: () => ({ id: String(w.modelId) }), request: () => patchModel({ clusters: ['A', 'B', 'C'].map((label) => ({ label, description: '', color: 'red"><script>alert(1)</script>' })) }), status: 422, names: /clusters\.0\.color/, field: 'clusters.0.color' },
  { name: 'fields: range upside down', handler: () => modelPATCH, params: () => ({ id: String(w.modelId) }), request: () => patchModel({ fields: FEATURES.map((f) => ({ feature: f, label: f, unit: '', min: 10, max: 5, help: '' })) }), status: 422, names: /lowest accepted value must be below/, field: 'fields.0.max' },
  // ---- scoring --------------------------------------------------------------------
  { name: 'score: a value missing', handler: () => scorePOST, params: scoreCtx, request: () => score({ avg_speed_kmh: 24, weekly_distance_km: 120 }), status: 422, names: /climb_per_ride_m is needed for this calculator/, field: 'values.climb_per_ride_m' },
  { name: 'score: an extra field', handler: () => scorePOST, params: scoreCtx, request: () => score({ ...goodValues, heart_rate: 150 }), status: 422, names: /"heart_rate" is not a field/, field: 'values.heart_rate' },
  { name: 'score: wrong-typed value', handler: () => scorePOST, params: scoreCtx, request: () => score({ ...goodValues, avg_speed_kmh: 'fast' }), status: 422, names: /avg_speed_kmh must be a number/, field: 'values.avg_speed_kmh' },
  { name: 'score: numeric text is not a number', handler: () => scorePOST, params: scoreCtx, request: () => score({ ...goodValues, weekly_distance_km: '120' }), status: 422, names: /weekly_distance_km must be a number/, field: 'values.weekly_distance_km' },
  { name: 'score: out of range', handler: () => scorePOST, params: scoreCtx, request: () => score({ ...goodValues, climb_per_ride_m: 1e7 }), status: 422, names: /climb_per_ride_m must be between/, field: 'values.climb_per_ride_m' },
  { name: 'score: non-finite (1e999)', handler: () => scorePOST, params: scoreCtx, request: () => publicPost(`/api/score/${w.embedToken}`, { body: '{"values":{"avg_speed_kmh":1e999,"weekly_distance_km":120,"climb_per_ride_m":400}}', type: 'application/json' }), status: 422, names: /avg_speed_kmh must be a (finite )?number/, field: 'values.avg_speed_kmh' },
  { name: 'score: values as an array', handler: () => scorePOST, params: scoreCtx, request: () => score([24, 120, 400]), status: 422, names: /object of field names and numbers/, field: 'values' },
  { name: 'score: unknown top-level key', handler: () => scorePOST, params: scoreCtx, request: () => score(goodValues, { callback: 'x' }), status: 422, names: /callback|[Uu]nrecognized/ },
  { name: 'score: oversized body', handler: () => scorePOST, params: scoreCtx, request: () => score({ ...goodValues }, { padding: 'x'.repeat(5000) }), status: 413, names: /larger than 4096 bytes/ },
  { name: 'score: wrong content type', handler: () => scorePOST, params: scoreCtx, request: () => publicPost(`/api/score/${w.embedToken}`, { body: 'avg_speed_kmh=24', type: 'application/x-www-form-urlencoded' }), status: 415, names: /JSON/ },
  { name: 'score: malformed JSON', handler: () => scorePOST, params: scoreCtx, request: () => publicPost(`/api/score/${w.embedToken}`, { body: '{"values": {', type: 'application/json' }), status: 400, names: /not valid JSON/ },
  { name: 'score: unknown token', handler: () => scorePOST, params: () => ({ token: 'NoSuchToken_abcdefghijkl' }), request: () => publicPost('/api/score/NoSuchToken_abcdefghijkl', { json: { values: goodValues } }), status: 404, names: /no calculator at this address/ },
  // ---- auth forms -----------------------------------------------------------------
  { name: 'sign-up: invalid e-mail', handler: () => signupPOST, request: () => signup({ email: 'robin-at-club' }), status: 422, names: /valid e-mail address/, field: 'email' },
  { name: 'sign-up: short password', handler: () => signupPOST, request: () => signup({ password: 'short' }), status: 422, names: /at least 10 characters/, field: 'password' },
  { name: 'sign-up: spaces-only password', handler: () => signupPOST, request: () => signup({ password: ' '.repeat(14) }), status: 422, names: /Spaces alone/, field: 'password' },
  { name: 'sign-up: missing workspace name', handler: () => signupPOST, request: () => signup({ workspaceName: undefined }), status: 422, names: /workspaceName/, field: 'workspaceName' },
  // A taken address is no longer an error (same 202 as a new one, tests/integration/accounts/signup-flow.test.ts).
  { name: 'sign-up: common password', handler: () => signupPOST, request: () => signup({ password: 'password1234' }), status: 422, names: /too easy to guess/, field: 'password' },
  { name: 'reset: unknown token', handler: () => resetPOST, request: () => publicPost('/api/account/password/reset', { json: { token: 'x'.repeat(40), password: 'a brand new password' } }), status: 404, names: /reset link is not valid/ },
  { name: 'reset: short password', handler: () => resetPOST, request: () => publicPost('/api/account/password/reset', { json: { token: 'x'.repeat(40), password: 'tiny' } }), status: 422, names: /at least 10 characters/, field: 'password' },
  { name: 'forgot: not an e-mail', handler: () => forgotPOST, request: () => publicPost('/api/account/password/forgot', { json: { email: '<script>@' } }), status: 422, names: /valid e-mail address/, field: 'email' },
  // ---- payment webhooks -------------------------------------------------------------
  { name: 'webhook: bad signature', handler: () => webhookPOST, request: () => webhook('{"id":"evt_1","type":"invoice.paid"}', 't=1,v1=deadbeef'), status: 400, names: /signature could not be verified/ },
  { name: 'webhook: missing signature', handler: () => webhookPOST, request: () => webhook('{"id":"evt_1","type":"invoice.paid"}'), status: 400, names: /Stripe-Signature header is missing/ },
  { name: 'webhook: signed but malformed JSON', handler: () => webhookPOST, request: () => { const b = '{"id":"evt_2","type":'; return webhook(b, signed(b)); }, status: 400, names: /could not be verified|JSON/ },
  // ---- abuse reports -------------------------------------------------------------
  { name: 'report: unknown reason', handler: () => reportsPOST, request: () => report({ reason: 'boring' }), status: 422, names: /Choose a reason/, field: 'reason' },
  { name: 'report: message too short', handler: () => reportsPOST, request: () => report({ message: 'bad' }), status: 422, names: /at least 10 characters/, field: 'message' },
  { name: 'report: invalid e-mail', handler: () => reportsPOST, request: () => report({ email: 'nobody' }), status: 422, names: /valid e-mail address/, field: 'email' },
  { name: 'report: extra key', handler: () => reportsPOST, request: () => report({ isStaff: true }), status: 422, names: /isStaff|[Uu]nrecognized/ },
  { name: 'report: unknown calculator', handler: () => reportsPOST, request: () => report({ token: 'NoSuchToken_abcdefghijkl' }), status: 404, names: /no calculator at this address/ },
  // ---- odd input: ids that are not plain decimal -------------------------------------
  // z.coerce.number() read all of these as numbers; "0x…" and "….0" acted on the real record.
  { name: 'id: hexadecimal (0x…) does not reach the embed', handler: () => embedPATCH, params: () => ({ id: `0x${w.embedId.toString(16)}` }), request: () => asOwner(`/api/embeds/0x${w.embedId.toString(16)}`, { method: 'PATCH', json: { title: 'Renamed through a hex id' } }), status: 422, names: /id: must be a positive whole number written in digits/, field: 'id' },
  { name: 'id: exponent (6e0)', handler: () => embedGET, params: () => ({ id: `${w.embedId}e0` }), request: () => asOwner(`/api/embeds/${w.embedId}e0`), status: 422, names: /written in digits/, field: 'id' },
  { name: 'id: Infinity', handler: () => modelGET, params: () => ({ id: 'Infinity' }), request: () => asOwner('/api/models/Infinity'), status: 422, names: /written in digits/, field: 'id' },
  { name: 'id: 1e400', handler: () => modelGET, params: () => ({ id: '1e400' }), request: () => asOwner('/api/models/1e400'), status: 422, names: /written in digits/, field: 'id' },
  { name: 'id: beyond the safe integers', handler: () => fitGET, params: () => ({ id: '9007199254740993' }), request: () => asOwner('/api/fits/9007199254740993'), status: 422, names: /written in digits/, field: 'id' },
  { name: 'id: leading space and plus sign', handler: () => datasetGET, params: () => ({ id: ` +${w.datasetId}` }), request: () => asOwner(`/api/datasets/%20%2B${w.datasetId}`), status: 422, names: /written in digits/, field: 'id' },
  { name: 'id: NUL inside', handler: () => datasetGET, params: () => ({ id: `${w.datasetId}${NUL}` }), request: () => asOwner(`/api/datasets/${w.datasetId}%00`), status: 422, names: /written in digits/, field: 'id' },
  { name: 'id: hexadecimal dataset filter on the fit list', handler: () => fitsGET, request: () => asOwner(`/api/fits?datasetId=0x${w.datasetId.toString(16)}`), status: 422, names: /datasetId: must be a positive whole number/, field: 'datasetId' },
  { name: 'id: candidate index as an exponent', handler: () => fitReviewGET, params: () => ({ id: String(w.fitId) }), request: () => asOwner(`/api/fits/${w.fitId}/review?candidate=1e0`), status: 422, names: /candidate: must be a whole number written in digits/, field: 'candidate' },
  { name: 'id: dataset preview size in hexadecimal', handler: () => datasetGET, params: () => ({ id: String(w.datasetId) }), request: () => asOwner(`/api/datasets/${w.datasetId}?preview=0x10`), status: 422, names: /preview/, field: 'preview' },
  // The current-workspace cookie is an id too: "1e400" read as Infinity reached the query.
  ...['1e400', `0x${(2).toString(16)}`].map((value): Case => ({ name: `id: workspace cookie "${value}" falls back to the member's own workspace`, handler: () => embedPATCH, params: () => ({ id: String(w.embedId) }), request: async () => makeRequest(`/api/embeds/${w.embedId}`, { method: 'PATCH', json: { title: `Bad${NUL}` }, headers: { cookie: `${await sessionCookie(w.users.owner.id)}; ${WORKSPACE_COOKIE}=${value}` } }), status: 422, names: NUL_SAID, field: 'title' })),
  // ---- odd input: NUL characters and unpaired surrogates in text ---------------------
  { name: 'report: NUL in the token', handler: () => reportsPOST, request: () => report({ token: `${w.embedToken.slice(0, 12)}${NUL}${w.embedToken.slice(12)}` }), status: 422, names: /calculator token contains a NUL/, field: 'token' },
  { name: 'report: NUL in the message', handler: () => reportsPOST, request: () => report({ message: `The labels are misleading${NUL} here.` }), status: 422, names: NUL_SAID, field: 'message' },
  { name: 'report: unpaired surrogate in the message', handler: () => reportsPOST, request: () => report({ message: `The labels are misleading ${LONE} here.` }), status: 422, names: LONE_SAID, field: 'message' },
  { name: 'report: NUL in the host page address', handler: () => reportsPOST, request: () => report({ hostOrigin: `https://club.example${NUL}` }), status: 422, names: NUL_SAID, field: 'hostOrigin' },
  { name: 'support search: NUL in the search', handler: () => supportSearchGET, request: () => asStaff('/api/support/calculators?q=river%00side'), status: 422, names: /search contains a NUL/, field: 'q' },
  { name: 'support search: page in hexadecimal', handler: () => supportSearchGET, request: () => asStaff('/api/support/calculators?page=0x2'), status: 422, names: /page must be a whole number/, field: 'page' },
  { name: 'support audit: NUL in the actor filter', handler: () => supportAuditGET, request: () => asStaff('/api/support/audit?actor=owner%00%40matrix.test'), status: 422, names: /e-mail contains a NUL/, field: 'actor' },
  { name: 'support audit: NUL in the action and workspace filters', handler: () => supportAuditGET, request: () => asStaff('/api/support/audit?action=embed%00&workspace=Club%00'), status: 422, names: /action contains a NUL.*workspace contains a NUL/, field: 'workspace' },
  { name: 'support: NUL in a disable reason', handler: () => supportDisablePOST, params: () => ({ id: String(w.embedId) }), request: () => asStaff(`/api/support/calculators/${w.embedId}/disable`, { json: { reason: `Spam${NUL} offers on the host page` } }), status: 422, names: /reason contains a NUL/, field: 'reason' },
  { name: 'model: NUL in the name', handler: () => modelPATCH, params: () => ({ id: String(w.modelId) }), request: () => patchModel({ name: `Club riders${NUL}` }), status: 422, names: NUL_SAID, field: 'name' },
  { name: 'model: unpaired surrogate in a cluster label', handler: () => modelPATCH, params: () => ({ id: String(w.modelId) }), request: () => patchModel({ clusters: ['Climbers', `Sprinters ${LONE}`, 'Tourers'].map((label) => ({ label, description: '', color: '#3a8a74' })) }), status: 422, names: LONE_SAID, field: 'clusters.1.label' },
  { name: 'model: NUL in a field help text', handler: () => modelPATCH, params: () => ({ id: String(w.modelId) }), request: () => patchModel({ fields: FEATURES.map((f) => ({ feature: f, label: f, unit: 'km', min: 0, max: 500, help: `Your usual${NUL}` })) }), status: 422, names: NUL_SAID, field: 'fields.0.help' },
  { name: 'model: unpaired surrogate in the caution', handler: () => modelPATCH, params: () => ({ id: String(w.modelId) }), request: () => patchModel({ caution: `Estimates only \udc00` }), status: 422, names: LONE_SAID, field: 'caution' },
  { name: 'model from a fit: NUL in the name', handler: () => modelsPOST, request: () => model(0, { name: `From${NUL}fit` }), status: 422, names: NUL_SAID, field: 'name' },
  { name: 'fit: NUL in a feature name', handler: () => fitsPOST, request: () => fit({ features: [`avg_speed_kmh${NUL}`, 'weekly_distance_km'] }), status: 422, names: NUL_SAID, field: 'features.0' },
  { name: 'calculator: NUL in the title', handler: () => embedPATCH, params: () => ({ id: String(w.embedId) }), request: () => asOwner(`/api/embeds/${w.embedId}`, { method: 'PATCH', json: { title: `Which rider are you?${NUL}` } }), status: 422, names: /title contains a NUL/, field: 'title' },
  { name: 'calculator: unpaired surrogate in the title', handler: () => embedPATCH, params: () => ({ id: String(w.embedId) }), request: () => asOwner(`/api/embeds/${w.embedId}`, { method: 'PATCH', json: { title: `Which rider ${LONE} are you?` } }), status: 422, names: LONE_SAID, field: 'title' },
  { name: 'calculator: NUL in an allowed origin', handler: () => embedPATCH, params: () => ({ id: String(w.embedId) }), request: () => asOwner(`/api/embeds/${w.embedId}`, { method: 'PATCH', json: { allowedOrigins: [`https://club.example${NUL}.evil.test`] } }), status: 422, names: /allowedOrigins\.0|NUL/, field: 'allowedOrigins.0' },
  { name: 'dataset: unpaired surrogate in the name', handler: () => datasetPATCH, params: () => ({ id: String(w.datasetId) }), request: () => asOwner(`/api/datasets/${w.datasetId}`, { method: 'PATCH', json: { name: `Summer rides ${LONE}` } }), status: 422, names: LONE_SAID, field: 'name' },
  { name: 'dataset: NUL in a feature unit', handler: () => datasetPATCH, params: () => ({ id: String(w.datasetId) }), request: () => asOwner(`/api/datasets/${w.datasetId}`, { method: 'PATCH', json: { features: [{ name: 'avg_speed_kmh', displayName: 'Speed', unit: `km/h${NUL}`, inputMin: 0, inputMax: 80 }] } }), status: 422, names: NUL_SAID, field: 'features.0.unit' },
  { name: 'upload: NUL in a text cell past the first 8 KB', handler: () => datasetsPOST, request: () => upload(lateNulCsv()), status: 422, names: /Row 252, column "rider" contains a NUL character/, field: 'row 252, column rider' },
  { name: 'upload: NUL in the dataset name (?name=)', handler: () => datasetsPOST, request: () => asOwner(`/api/datasets?filename=t.csv&name=Rides%00`, { body: [HEADER, ...goodRows(12)].join('\n'), headers: { 'content-type': 'text/csv' } }), status: 422, names: /dataset name contains a NUL/, field: 'name' },
  // (A lone surrogate cannot arrive in a file name: multipart and URLs carry UTF-8, which has none.)
  { name: 'upload: NUL in the file name (?filename=)', handler: () => datasetsPOST, request: () => asOwner(`/api/datasets?filename=rides%00.csv`, { body: [HEADER, ...goodRows(12)].join('\n'), headers: { 'content-type': 'text/csv' } }), status: 422, names: /file name contains a NUL/, field: 'filename' },
  { name: 'upload: NUL in the form name field', handler: () => datasetsPOST, request: () => { const f = new FormData(); f.set('file', new File([[HEADER, ...goodRows(12)].join('\n')], 'rides.csv', { type: 'text/csv' })); f.set('name', `Rides${NUL}`); return multipart(f); }, status: 422, names: NUL_SAID, field: 'name' },
  { name: 'sign-up: NUL in the name', handler: () => signupPOST, request: () => signup({ name: `Robin${NUL}Rider`, email: 'robin.nul@club.test' }), status: 422, names: NUL_SAID, field: 'name' },
  { name: 'sign-up: unpaired surrogate in the workspace name', handler: () => signupPOST, request: () => signup({ workspaceName: `Club ${LONE}`, email: 'robin.lone@club.test' }), status: 422, names: LONE_SAID, field: 'workspaceName' },
  { name: 'workspace: NUL in a new workspace name', handler: () => workspacesPOST, request: () => asOwner('/api/workspaces', { json: { name: `Second club${NUL}` } }), status: 422, names: NUL_SAID, field: 'name' },
  { name: 'reset: NUL in the token', handler: () => resetPOST, request: () => publicPost('/api/account/password/reset', { json: { token: `${'x'.repeat(20)}${NUL}${'x'.repeat(20)}`, password: 'a brand new password' } }), status: 422, names: /link contains a NUL/, field: 'token' },
  // ---- odd input: /api addresses no route file has (app/api/[[...rest]]) ------------------
  { name: 'unknown API address', handler: () => unknownApiGET, request: () => asOwner('/api/embeds/1/nope'), status: 404, names: /no API at this address/ },
  { name: 'unknown API address, DELETE', handler: () => unknownApiDELETE, request: () => asOwner('/api/nothing-here', { method: 'DELETE', headers: { origin: 'https://evil.test' } }), status: 404, names: /no API at this address/ },
  // Last: before the fix "12.0" deleted dataset 12, which would empty the cases above.
  { name: 'id: trailing ".0" does not delete the dataset', handler: () => datasetDELETE, params: () => ({ id: `${smallDatasetId}.0` }), request: () => asOwner(`/api/datasets/${smallDatasetId}.0`, { method: 'DELETE' }), status: 422, names: /written in digits/, field: 'id' },
];

beforeAll(async () => {
  w = await buildWorld();
  // The world's version carries a placeholder checksum; give it the real one so it serves.
  const version = (await ModelVersion.findByPk(w.versionId))!;
  await version.update({ checksum: payloadChecksum(version.payload as unknown as VersionPayload) });
  clearScoringCaches();
  // Workspace B on the free plan, for the upload-size cases.
  await Subscription.update({ plan: 'sketch' }, { where: { workspaceId: w.otherWorkspaceId } });

  const csv = ['speed,distance,club_size', ...Array.from({ length: 12 }, (_, i) => `${20 + (i % 5)},${50 + i * 7},40`)].join('\n');
  const table = parseCsvText(csv);
  const small = await Dataset.create({ workspaceId: w.workspaceId, createdById: w.users.owner.id, name: 'Small', originalFilename: 'small.csv', originalCsv: Buffer.from(csv), columns: table.columns, cells: table.cells, rowCount: 12 });
  smallDatasetId = small.id;

  goodModelJson = (await MixtureModel.findByPk(w.modelId))!.model as Record<string, unknown>;
  const candidate = (model: Record<string, unknown>, rank: number) => ({ rank, components: 3, covariance: 'full', bic: 1, aic: 1, logLikelihood: 1, parameters: 1, iterations: 1, converged: true, error: null, trace: [1], model });
  const models = [
    damaged((m) => delete m.means),
    damaged((m) => (m.means[0] = m.means[0].slice(0, 2))),
    damaged((m) => (m.covariances[0][0][1] += 1)),
    damaged((m) => (m.covariances[1] = [[1, 2, 0], [2, 1, 0], [0, 0, 1]])),
    damaged((m) => (m.weights = [0.5, 0.3, 0.3])),
  ];
  const fitRow = await Fit.create({ workspaceId: w.workspaceId, datasetId: w.datasetId, createdById: w.users.owner.id, status: 'succeeded', params: {}, finishedAt: new Date(), result: { criterion: 'bic', rows: 100, candidates: models.map((m, i) => candidate(m, i + 1)) } as unknown as Record<string, unknown> });
  damagedFitId = fitRow.id;
});

describe('bad-input catalogue', () => {
  it('has at least 40 cases', () => {
    expect(CASES.length).toBeGreaterThanOrEqual(40);
  });

  for (const c of CASES) {
    it(c.name, async () => {
      const before = await fingerprint();
      const request = await c.request();
      const response = await c.handler()(request, { params: Promise.resolve(c.params?.() ?? {}) });
      const body = (await response.json()) as { error?: { code: string; message: string; issues?: { field: string; message: string }[] } };
      const statuses = Array.isArray(c.status) ? c.status : [c.status];
      expect(statuses, `status ${response.status}: ${JSON.stringify(body)}`).toContain(response.status);
      expect(body.error, 'an error body').toBeDefined();
      const said = [body.error!.message, ...(body.error!.issues ?? []).flatMap((i) => [i.field, i.message])].join(' | ');
      expect(said).toMatch(c.names);
      if (c.field) expect((body.error!.issues ?? []).map((i) => i.field)).toContainEqual(typeof c.field === 'string' ? c.field : expect.stringMatching(c.field));
      const after = await fingerprint();
      expect(changedTables(before, after), 'tables changed by a refused request').toEqual([]);
    });
  }
});

describe('markup in labels and texts is stored as text and never becomes live', () => {
  const SCRIPT = '<script>alert("label")</script>';
  const IMG = '<img src=x onerror=alert(1)>';

  it('stores labels verbatim, scores them back as JSON strings, and keeps them out of chart expressions', async () => {
    const clusters = [SCRIPT, IMG, '"><svg onload=alert(2)>'].map((label, i) => ({ label, description: `${IMG} description ${i}`, color: ['#3a8a74', '#e0a526', '#b8432f'][i] }));
    const res = await modelPATCH(await patchModel({ clusters, caution: `${SCRIPT} caution` }), { params: Promise.resolve({ id: String(w.modelId) }) });
    expect(res.status).toBe(200);
    const stored = (await MixtureModel.findByPk(w.modelId))!;
    expect(stored.clusters.map((c) => c.label)).toEqual(clusters.map((c) => c.label));
    expect(stored.caution).toBe(`${SCRIPT} caution`);

    // Publish-like: put those labels in the served version and score.
    const version = (await ModelVersion.findByPk(w.versionId))!;
    const payload = { ...(version.payload as unknown as VersionPayload), clusters };
    await version.update({ payload: payload as unknown as Record<string, unknown>, checksum: payloadChecksum(payload) });
    clearScoringCaches();
    const answer = await scorePOST(await score(goodValues), { params: Promise.resolve(scoreCtx()) });
    expect(answer.status).toBe(200);
    expect(answer.headers.get('content-type')).toMatch(/^application\/json/);
    const json = (await answer.json()) as { probabilities: { label: string }[] };
    expect(json.probabilities.map((p) => p.label)).toEqual(clusters.map((c) => c.label));

    // The chart spec: labels only as data (scale domain), never inside a vega expression,
    // where they would be compiled to code.
    const spec = membershipChartSpec(clusters, 'light');
    const expressions: string[] = [];
    const walk = (v: unknown, key = '') => {
      if (typeof v === 'string' && ['expr', 'update', 'signal', 'test', 'init', 'labelExpr', 'filter'].includes(key)) expressions.push(v);
      else if (Array.isArray(v)) v.forEach((x) => walk(x, key));
      else if (v && typeof v === 'object') for (const [k, x] of Object.entries(v)) walk(x, k);
    };
    walk(spec);
    // vega-lite writes the domain into a sort expression; there a label may only ever be a
    // string literal (quoted by vega-util), never an identifier or call vega would evaluate.
    expect(expressions.length).toBeGreaterThan(0);
    for (const e of expressions) {
      const literals: unknown[] = [];
      const callees: string[] = [];
      const visit = (node: any) => {
        if (!node || typeof node !== 'object') return;
        if (node.type === 'Literal') literals.push(node.value);
        if (node.type === 'Identifier') callees.push(node.name);
        for (const v of Object.values(node)) if (v && typeof v === 'object') Array.isArray(v) ? v.forEach(visit) : visit(v);
      };
      visit(parseExpression(e));
      for (const c of clusters) if (e.includes(JSON.stringify(c.label).slice(1, -1))) expect(literals).toContain(c.label);
      for (const name of callees) expect(name).toMatch(/^[A-Za-z_$][\w$]*$/);
    }
    expect(JSON.stringify(spec)).toContain(JSON.stringify(SCRIPT).slice(1, -1));
  });
});

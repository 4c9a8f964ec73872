import { z } from 'zod';
import { MAX_MASK_FIELDS, MixtureError, scoreRow, scoreRowPartial, type DistanceBand, type PartialRowScore } from '@/lib/mixture';
import { clientAddress } from '@/lib/audit';
import { callerOrigin } from '@/lib/embeds/origins';
import { AppError } from '@/lib/errors';
import { readJson, type BodySource } from '@/lib/http/handler';
import { calculatorBurstLimits, type BurstLimit, type PlanId } from '@/lib/plans';
import { consumeLimit, consumeLimits, refundLimits, type KeyedLimit } from '@/lib/rate-limit';
import { recordAnswer } from '@/lib/usage';
import { recordInsight } from '@/lib/insight/counters';
import { noteBurst, notePaused } from './alerts';
import { readyLedger, releaseAnswer, reserveAnswer, waitForLedger, type AnswerLedger } from './allowance';
import { scoringSettings } from './limits';
import { isServing, loadServedEmbed, loadServedVersion, parseValues, type ServedEmbed, type ServedVersion } from './served';

/** A scored answer as the calculator (and any allowed host page) receives it. */
export interface ScoreAnswer {
  version: number;
  probabilities: { index: number; label: string; color: string; probability: number }[];
  best: { index: number; label: string; description: string; probability: number };
  logDensity: number;
  typicality: number;
  unusual: boolean;
  threshold: number;
  /** The fields the answer was worked out from, in the model's order (the marginal over them). */
  used: string[];
  /** The fields left blank, in the model's order. */
  unused: string[];
  /** Why the best group and not the runner-up; null when the model has one group. */
  reason: AnswerReason | null;
}

/**
 * The log-odds of the best group against the runner-up over the used fields, split
 * additively: weightTerm + Σ fields[].contribution = logOdds (see lib/mixture/README.md,
 * "A reason with every answer"). z is the field's distance from the best group's centre
 * in that group's standard deviations; position is z in five bands.
 */
export interface AnswerReason {
  best: number;
  runnerUp: number;
  logOdds: number;
  weightTerm: number;
  /** 'per-field' (diagonal, spherical: order-free) or 'chain-rule' (full, tied: each field given the earlier ones, model order) */
  decomposition: 'per-field' | 'chain-rule';
  fields: { feature: string; contribution: number; z: number; position: DistanceBand }[];
}

/** Scoring bodies are a few numbers; anything bigger is refused before parsing. */
export const MAX_SCORE_BODY_BYTES = 4 * 1024;

/** The body of one visitor's answer: `values` maps each field's feature name to a number (or null for a blank optional field). */
export const scoreBodySchema = z.object({ values: z.unknown() }).strict();

/** The token in the route's address. */
export const scoreTokenParam = z.object({ token: z.string().max(64) });

/**
 * What the scoring flow reads of a call. The Next route builds it from a web Request
 * (`scoreCallFrom`); the server's fast path (lib/server) from node's request, so both
 * run this one flow.
 */
export interface ScoreCall extends BodySource {
  /** The client's address as the server saw it (see lib/server: forwarded headers are only trusted behind a configured proxy). */
  address: string | null;
  /** The origin the request came to (scheme, host, port). */
  requestOrigin: string;
}

export function scoreCallFrom(request: Request): ScoreCall {
  // The body stream, so readJson stops at the cap instead of request.text() reading it all.
  return { headers: request.headers, body: request.body, text: () => request.text(), address: clientAddress(request), requestOrigin: new URL(request.url).origin };
}

/** This app's own origins: the one the request came to, and NEXTAUTH_URL's. */
export function ownOrigins(requestOrigin: string): string[] {
  const list = [requestOrigin];
  const configured = process.env.NEXTAUTH_URL;
  if (configured) {
    try {
      list.push(new URL(configured).origin);
    } catch {}
  }
  return list;
}

/**
 * Browser calls carry Origin (or at least Referer). The calculator page posts from our
 * own origin; a host page calling directly must be on the embed's list. Calls without
 * either header (servers, scripts) are allowed and rate-limited like the rest.
 */
export function checkCaller(call: ScoreCall, embed: ServedEmbed): string | null {
  const origin = callerOrigin(call.headers);
  if (origin === null) return null;
  if (ownOrigins(call.requestOrigin).includes(origin) || embed.allowedOrigins.includes(origin)) return origin;
  throw new AppError('forbidden', 'This calculator does not answer requests from this website.');
}

export function corsHeaders(request: { headers: { get(name: string): string | null } }, embed: ServedEmbed | null): Record<string, string> {
  const origin = callerOrigin(request.headers);
  const headers: Record<string, string> = { Vary: 'Origin' };
  if (embed && origin && embed.allowedOrigins.includes(origin)) headers['Access-Control-Allow-Origin'] = origin;
  return headers;
}

function limited(retryAfterSeconds: number, what: string): AppError {
  return new AppError('rate_limited', `Too many answers ${what}; please try again in ${waitText(retryAfterSeconds)}.`, { headers: { 'Retry-After': String(retryAfterSeconds) } });
}

/** How long to wait, in words a visitor reads easily. */
function waitText(seconds: number): string {
  if (seconds <= 90) return `${seconds} second${seconds === 1 ? '' : 's'}`;
  const minutes = Math.ceil(seconds / 60);
  return `${minutes} minute${minutes === 1 ? '' : 's'}`;
}

/** A calculator's burst limit: neutral for the visitor, who did nothing wrong. */
function calculatorBusy(retryAfterSeconds: number): AppError {
  return new AppError('rate_limited', `Many people are using this calculator right now. Please try again in ${waitText(retryAfterSeconds)}.`, { headers: { 'Retry-After': String(retryAfterSeconds) } });
}

function paused(): AppError {
  return new AppError('unavailable', 'This calculator is taking a short break and will answer again soon.', { headers: { 'Retry-After': '3600' } });
}

interface BurstBuckets {
  plan: PlanId;
  scale: number;
  limits: BurstLimit[];
  buckets: KeyedLimit[];
}

// Per calculator, so the hot path builds no keys or options per answer.
const burstBucketCache = ((globalThis as Record<symbol, unknown>)[Symbol.for('partwise.burstBuckets')] ??= new Map<number, BurstBuckets>()) as Map<number, BurstBuckets>;

function burstBuckets(embedId: number, plan: PlanId, scale: number): BurstBuckets {
  const hit = burstBucketCache.get(embedId);
  if (hit && hit.plan === plan && hit.scale === scale) return hit;
  const limits = calculatorBurstLimits(plan).map((l) => ({ ...l, answers: Math.max(1, Math.floor(l.answers * scale)) }));
  const entry: BurstBuckets = { plan, scale, limits, buckets: limits.map((l) => ({ key: `score:burst:${embedId}:${l.window}`, opts: { limit: l.answers, windowMs: l.windowMs } })) };
  if (burstBucketCache.size >= 10_000) burstBucketCache.clear();
  burstBucketCache.set(embedId, entry);
  return entry;
}

/** The public scoring flow: cheap refusals first, then validation, then the allowance, then the engine. */
export async function scoreForToken(token: string, call: ScoreCall): Promise<{ answer: ScoreAnswer; embed: ServedEmbed }> {
  const rules = scoringSettings();
  const address = call.address ?? 'unknown';
  // Counted by lib/rate-limit: in Redis across every instance with REDIS_URL, else in this process.
  const byAddress = await consumeLimit(`score:addr:${address}`, rules.perAddress);
  if (!byAddress.ok) throw limited(byAddress.retryAfterSeconds, 'from your network');

  const embed = await loadServedEmbed(token);
  if (!embed) throw new AppError('not_found', 'There is no calculator at this address.');
  if (!isServing(embed)) throw new AppError('gone', 'This calculator is not available.');
  checkCaller(call, embed);

  const byToken = await consumeLimit(`score:token:${embed.id}`, rules.perToken);
  if (!byToken.ok) throw limited(byToken.retryAfterSeconds, 'for this calculator right now');

  const body = await readJson(call, scoreBodySchema, { maxBytes: MAX_SCORE_BODY_BYTES });
  const version = await loadServedVersion(embed.activeVersionId!);
  const values = parseValues(version, body.values);

  const burst = await takeBurst(embed, readyLedger(embed.workspaceId) ?? (await settleLedger(embed.workspaceId)), rules.burstScale);
  // The ledger may have been re-read while the limiter answered: reserve from the current one.
  const ledger = readyLedger(embed.workspaceId) ?? (await settleLedger(embed.workspaceId));
  // From here to recordAnswer nothing awaits: the pause check, the reservation and the
  // metering happen in one step, so concurrent answers cannot pass the line together.
  // A refusal here gives the burst windows their point back.
  if (ledger.used >= ledger.pauseAt) {
    void refundLimits(burst.buckets);
    notePaused(ledger);
    throw paused();
  }
  if (!reserveAnswer(ledger)) {
    void refundLimits(burst.buckets);
    throw paused();
  }
  let score: PartialRowScore;
  try {
    score = scoreValues(version, values, embed.typicalityThreshold);
  } catch (error) {
    releaseAnswer(ledger);
    // parseValues has already refused what the engine would (blank required fields, no value at all).
    if (error instanceof MixtureError) throw new AppError('invalid_input', error.message, { issues: [{ field: 'values', message: error.message }] });
    throw error;
  }
  recordAnswer(embed);
  recordInsight(embed, version.insight, values, score.best, score.unusual);
  if (ledger.used >= ledger.pauseAt) notePaused(ledger);

  const clusters = version.payload.clusters;
  const fieldNames = fieldLists(version, score.mask);
  const answer: ScoreAnswer = {
    version: version.number,
    probabilities: score.probabilities.map((p, i) => ({ index: i, label: clusters[i].label, color: clusters[i].color, probability: p })),
    best: { index: score.best, label: clusters[score.best].label, description: clusters[score.best].description, probability: score.probabilities[score.best] },
    logDensity: score.logDensity,
    typicality: score.typicality,
    unusual: score.unusual,
    threshold: embed.typicalityThreshold,
    used: fieldNames.used,
    unused: fieldNames.unused,
    reason: answerReason(version, score),
  };
  return { answer, embed };
}

/** Count the answer in each of the calculator's burst windows (every window or none), else a refusal. */
async function takeBurst(embed: ServedEmbed, ledger: AnswerLedger, burstScale: number): Promise<BurstBuckets> {
  // Already paused: refuse without spending the windows.
  if (ledger.used >= ledger.pauseAt) {
    notePaused(ledger);
    throw paused();
  }
  const burst = burstBuckets(embed.id, ledger.plan, burstScale);
  const taken = await consumeLimits(burst.buckets);
  if (!taken.ok) {
    noteBurst(embed, ledger, burst.limits[taken.blocked], Date.now());
    throw calculatorBusy(taken.retryAfterSeconds);
  }
  return burst;
}

/** Wait for the workspace's ledger to be read (only when it is not ready: the usual path does not await). */
async function settleLedger(workspaceId: number): Promise<AnswerLedger> {
  let ledger: AnswerLedger | null = null;
  for (let tries = 0; !ledger; tries++) {
    const read = await waitForLedger(workspaceId);
    ledger = readyLedger(workspaceId) ?? (tries >= 2 ? read : null);
  }
  return ledger;
}

/**
 * The engine's answer for a validated row: the marginal over the observed fields, with
 * the breakdown. A version's stored sample measures typicality of partial rows (the
 * engine's default sample for versions published before samples were stored).
 */
function scoreValues(version: ServedVersion, row: (number | null)[], unusualBelow: number): PartialRowScore {
  if (version.engine.features.length > MAX_MASK_FIELDS) {
    // Too wide for blank fields (publishing refuses optional fields there), so every field is given.
    const full = scoreRow(version.engine, row as number[], { unusualBelow });
    return { ...full, typicalityReference: 'training', used: row.map(() => true), mask: ALL_FIELDS, complete: true };
  }
  return scoreRowPartial(version.engine, row, { unusualBelow, sample: version.sample ?? undefined, explain: true });
}

/** Stands for "every field" where a model is too wide for a 32-bit mask. */
const ALL_FIELDS = -1;

type FieldLists = { used: string[]; unused: string[] };
// Per version and mask: a calculator sees few masks, and the lists are only ever serialised.
const fieldListCache = new WeakMap<ServedVersion, Map<number, FieldLists>>();

function fieldLists(version: ServedVersion, mask: number): FieldLists {
  let byMask = fieldListCache.get(version);
  if (!byMask) fieldListCache.set(version, (byMask = new Map()));
  let hit = byMask.get(mask);
  if (!hit) {
    const fields = version.payload.fields;
    const used = fields.filter((_, j) => mask === ALL_FIELDS || ((mask >>> j) & 1) === 1).map((f) => f.feature);
    hit = { used, unused: fields.filter((f) => !used.includes(f.feature)).map((f) => f.feature) };
    if (byMask.size < 256) byMask.set(mask, hit);
  }
  return hit;
}

function answerReason(version: ServedVersion, score: PartialRowScore): AnswerReason | null {
  const r = score.reason;
  if (!r || r.runnerUp === null || r.logOdds === null || r.weightTerm === null) return null;
  const fields: AnswerReason['fields'] = [];
  for (const f of r.fields) {
    if (f.used && f.contribution !== null && f.z !== null && f.band !== null) fields.push({ feature: version.payload.fields[f.field].feature, contribution: f.contribution, z: f.z, position: f.band });
  }
  return { best: r.best, runnerUp: r.runnerUp, logOdds: r.logOdds, weightTerm: r.weightTerm, decomposition: r.decomposition, fields };
}

/**
 * Blank fields and the reason with every answer, through the public scoring route: a
 * field the publisher made optional may be left out or sent as null and the answer is the
 * engine's marginal over the fields given (compared here with lib/mixture directly); a
 * blank required field, or no value at all, is a 422 naming what to fill in; the answer
 * says which fields it used and why the best group beat the runner-up. Publishing stores
 * the typicality sample with the version, under its checksum; versions published before
 * samples existed still answer, from the engine's default sample.
 */
import { beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { makeRequest } from '../../helpers/auth';
import { POST as scoreRoute } from '@/app/api/score/[token]/route';
import { PATCH as patchModelRoute } from '@/app/api/models/[id]/route';
import { payloadChecksum, validatePayload, type VersionPayload } from '@/lib/embeds/payload';
import { publishNew, publishVersion } from '@/lib/embeds/service';
import {
  decodeTypicalitySample,
  defaultTypicalitySample,
  encodeTypicalitySample,
  explainRow,
  parseModelJson,
  scoreRow,
  scoreRowPartial,
  typicalitySample,
  type MixtureModel as EngineModel,
} from '@/lib/mixture';
import { rateLimitTesting } from '@/lib/rate-limit';
import { clearScoringCaches, type ScoreAnswer } from '@/lib/scoring';
import { Embed, MixtureModel, ModelVersion } from '@/models';
import { createModel, modelWorkspace } from './fixtures';

const tokenCtx = (token: string) => ({ params: Promise.resolve({ token }) });
const good = { avg_speed_kmh: 24.5, weekly_distance_km: 130, climb_per_ride_m: 420 };

let ws: Awaited<ReturnType<typeof modelWorkspace>>;
let acting: { user: typeof ws.owner; workspace: typeof ws.workspace };
let engine: EngineModel;
let token: string;
let embedId: number;

async function post(values: unknown, t = token) {
  return scoreRoute(await makeRequest(`/api/score/${t}`, { json: { values } }), tokenCtx(t));
}

async function answer(values: unknown, t = token): Promise<ScoreAnswer> {
  const res = await post(values, t);
  const body = await res.json();
  expect(res.status, JSON.stringify(body)).toBe(200);
  return body as ScoreAnswer;
}

/** Set which fields may be left blank, by feature name. */
async function makeOptional(model: MixtureModel, features: string[]) {
  model.fields = model.fields.map((f) => ({ ...f, optional: features.includes(f.feature) }));
  model.changed('fields', true);
  await model.save();
}

beforeAll(async () => {
  ws = await modelWorkspace();
  acting = { user: ws.owner, workspace: ws.workspace };
  await makeOptional(ws.model, ['climb_per_ride_m']);
  engine = parseModelJson(ws.model.model);
  const { embed } = await publishNew(acting, { mixtureModelId: ws.model.id, title: 'Blank fields' });
  token = embed.token;
  embedId = embed.id;
});

beforeEach(() => {
  rateLimitTesting.clear();
});

async function storedSample(versionId: number) {
  const row = await ModelVersion.findByPk(versionId);
  return decodeTypicalitySample((row!.payload as VersionPayload).typicalitySample, engine.features.length);
}

describe('blank fields, answered exactly', () => {
  it('answers a blank optional field (left out or null) with the marginal over the other fields, as the engine does', async () => {
    const embed = (await Embed.findByPk(embedId))!;
    const sample = await storedSample(embed.activeVersionId!);
    const expected = scoreRowPartial(engine, [good.avg_speed_kmh, good.weekly_distance_km, null], { sample, explain: true });
    expect(expected.typicalityReference).toBe('sample');

    const left = await answer({ avg_speed_kmh: good.avg_speed_kmh, weekly_distance_km: good.weekly_distance_km });
    const nulled = await answer({ ...good, climb_per_ride_m: null });
    expect(nulled).toEqual(left);
    expect(left.probabilities.map((p) => p.probability)).toEqual(expected.probabilities);
    expect(left.logDensity).toBe(expected.logDensity);
    expect(left.typicality).toBe(expected.typicality);
    expect(left.best.index).toBe(expected.best);
    expect(left.used).toEqual(['avg_speed_kmh', 'weekly_distance_km']);
    expect(left.unused).toEqual(['climb_per_ride_m']);

    // Not the full density with a made-up value: the answer differs from any complete row's.
    const full = scoreRow(engine, [good.avg_speed_kmh, good.weekly_distance_km, good.climb_per_ride_m]);
    expect(left.logDensity).not.toBeCloseTo(full.logDensity, 3);
  });

  it('answers a complete row exactly as before (training quantiles), using every field', async () => {
    const got = await answer(good);
    const expected = scoreRow(engine, [good.avg_speed_kmh, good.weekly_distance_km, good.climb_per_ride_m]);
    expect(got.probabilities.map((p) => p.probability)).toEqual(expected.probabilities);
    expect(got.logDensity).toBe(expected.logDensity);
    expect(got.typicality).toBe(expected.typicality);
    expect(got.used).toEqual(['avg_speed_kmh', 'weekly_distance_km', 'climb_per_ride_m']);
    expect(got.unused).toEqual([]);
  });

  it('refuses a blank required field with a 422 naming it, left out or null, beside other problems', async () => {
    for (const values of [{ weekly_distance_km: 130 }, { avg_speed_kmh: null, weekly_distance_km: 130 }]) {
      const res = await post(values);
      expect(res.status).toBe(422);
      const issues: { field: string; message: string }[] = (await res.json()).error.issues;
      expect(issues).toEqual([{ field: 'values.avg_speed_kmh', message: 'Average speed is needed for this calculator.' }]);
    }
    const res = await post({ weekly_distance_km: 'far', climb_per_ride_m: 5000 });
    const byField = Object.fromEntries(((await res.json()).error.issues as { field: string; message: string }[]).map((i) => [i.field, i.message]));
    expect(byField).toEqual({
      'values.avg_speed_kmh': 'Average speed is needed for this calculator.',
      'values.weekly_distance_km': 'Weekly distance must be a number.',
      'values.climb_per_ride_m': 'Climbing per ride must be between 0 and 3000 m.',
    });
  });

  it('refuses a row with no value at all with a 422, also when every field may be left blank', async () => {
    const res = await post({});
    expect(res.status).toBe(422);
    expect((await res.json()).error.issues.map((i: { field: string }) => i.field)).toEqual(['values.avg_speed_kmh', 'values.weekly_distance_km']);

    const open = await createModel(ws.workspace.id, ws.owner.id, 3, 'All optional');
    await makeOptional(open, ['avg_speed_kmh', 'weekly_distance_km', 'climb_per_ride_m']);
    const openToken = (await publishNew(acting, { mixtureModelId: open.id, title: 'All optional' })).embed.token;
    for (const values of [{}, { avg_speed_kmh: null, weekly_distance_km: null, climb_per_ride_m: null }]) {
      const none = await post(values, openToken);
      expect(none.status).toBe(422);
      const body = await none.json();
      expect(body.error.code).toBe('invalid_input');
      expect(body.error.issues).toEqual([{ field: 'values', message: 'Enter at least one value to get an answer.' }]);
    }
    // One field is enough.
    const one = await answer({ climb_per_ride_m: 900 }, openToken);
    expect(one.used).toEqual(['climb_per_ride_m']);
    expect(one.unused).toEqual(['avg_speed_kmh', 'weekly_distance_km']);
    const engineOpen = parseModelJson(open.model);
    expect(one.probabilities.map((p) => p.probability)).toEqual(scoreRowPartial(engineOpen, [null, null, 900]).probabilities);
  });
});

describe('a reason with every answer', () => {
  it('gives the best group, the runner-up and a per-field breakdown that sums to the log-odds', async () => {
    for (const values of [good, { avg_speed_kmh: 31, weekly_distance_km: 250 }, { ...good, climb_per_ride_m: 1100 }, { avg_speed_kmh: 19, weekly_distance_km: 40, climb_per_ride_m: null }]) {
      const got = await answer(values);
      const reason = got.reason!;
      expect(reason).not.toBeNull();
      expect(reason.best).toBe(got.best.index);
      expect(reason.runnerUp).not.toBe(reason.best);
      expect(reason.fields.map((f) => f.feature)).toEqual(got.used);
      const sum = reason.weightTerm + reason.fields.reduce((s, f) => s + f.contribution, 0);
      expect(Math.abs(sum - reason.logOdds)).toBeLessThan(1e-9);
      // The log-odds is the one between the two groups' posteriors.
      const p = got.probabilities.map((x) => x.probability);
      expect(reason.logOdds).toBeCloseTo(Math.log(p[reason.best]) - Math.log(p[reason.runnerUp]), 8);
      expect(reason.decomposition).toBe('chain-rule');

      const row = engine.features.map((f) => ((values as Record<string, number | null>)[f.name] ?? null));
      const fromEngine = explainRow(engine, row);
      expect(reason.weightTerm).toBe(fromEngine.weightTerm);
      expect(reason.logOdds).toBe(fromEngine.logOdds);
      for (const f of reason.fields) {
        const j = engine.features.findIndex((x) => x.name === f.feature);
        expect(f.contribution).toBe(fromEngine.fields[j].contribution);
        const z = (row[j]! - engine.means[reason.best][j]) / Math.sqrt(engine.covariances[reason.best][j][j]);
        expect(f.z).toBeCloseTo(z, 10);
        expect(f.position).toBe(z < -2 ? 'well_below' : z < -1 ? 'below' : z <= 1 ? 'typical' : z <= 2 ? 'above' : 'well_above');
      }
    }
  });

  it('has no reason for a model with one group', async () => {
    const single = await createModel(ws.workspace.id, ws.owner.id, 1, 'One group');
    const singleToken = (await publishNew(acting, { mixtureModelId: single.id, title: 'One group' })).embed.token;
    const got = await answer(good, singleToken);
    expect(got.reason).toBeNull();
    expect(got.probabilities.map((p) => p.probability)).toEqual([1]);
  });
});

describe('the typicality sample of a published version', () => {
  it('is stored with each new version, drawn from its model, and covered by the checksum', async () => {
    const { version } = await publishVersion(acting, embedId);
    const stored = (await ModelVersion.findByPk(version.id))!;
    const payload = stored.payload as VersionPayload;
    expect(payload.typicalitySample).toMatchObject({ format: 'partwise.typicality-sample', version: 1, size: 2000, dimensions: 3, seed: 0 });
    expect(stored.checksum).toBe(payloadChecksum(payload));
    const { typicalitySample: _s, ...withoutSample } = payload;
    expect(payloadChecksum(withoutSample)).not.toBe(stored.checksum);
    expect(Array.from((await storedSample(version.id)).rows)).toEqual(Array.from(typicalitySample(engine).rows));

    // A changed sample is a damaged version: refused rather than served with other quantiles.
    const sample = payload.typicalitySample!;
    const flipped = sample.data[10] === 'A' ? 'B' : 'A';
    await stored.update({ payload: { ...payload, typicalitySample: { ...sample, data: sample.data.slice(0, 10) + flipped + sample.data.slice(11) } } });
    clearScoringCaches();
    const res = await post(good);
    expect(res.status).toBe(503);
    await stored.update({ payload });
    clearScoringCaches();
    expect((await post(good)).status).toBe(200);
  });

  it('refuses to publish a payload whose optional setting or sample is malformed', () => {
    const base: VersionPayload = { model: ws.model.model, clusters: ws.model.clusters, fields: ws.model.fields, caution: '' };
    expect(() => validatePayload(base)).not.toThrow();
    const badOptional = { ...base, fields: base.fields.map((f, j) => (j === 1 ? { ...f, optional: 'yes' as unknown as boolean } : f)) };
    expect(() => validatePayload(badOptional)).toThrow(/Say whether "weekly_distance_km" may be left blank/);
    const wrongWidth = { ...base, typicalitySample: { ...encodeTypicalitySample(typicalitySample(engine)), dimensions: 2 } };
    expect(() => validatePayload(wrongWidth)).toThrow(/typicality sample/);
  });

  it('answers versions published before samples were stored, from the engine\'s default sample', async () => {
    const model = (await MixtureModel.findByPk(ws.model.id))!;
    const { embed } = await publishNew(acting, { mixtureModelId: model.id, title: 'Old version' });
    // A version as published before this change: no sample in the payload, checksum of that payload.
    const old: VersionPayload = { model: model.model, clusters: model.clusters, fields: model.fields, caution: model.caution };
    const version = await ModelVersion.create({ embedId: embed.id, mixtureModelId: model.id, createdById: ws.owner.id, number: 2, payload: old, checksum: payloadChecksum(old) });
    await embed.update({ activeVersionId: version.id });
    clearScoringCaches();

    const got = await answer({ avg_speed_kmh: 22, weekly_distance_km: 100 }, embed.token);
    expect(got.version).toBe(2);
    const fresh = parseModelJson(model.model);
    const expected = scoreRowPartial(fresh, [22, 100, null], { sample: defaultTypicalitySample(fresh) });
    expect(got.typicality).toBe(expected.typicality);
    expect(got.probabilities.map((p) => p.probability)).toEqual(expected.probabilities);
    expect(got.unused).toEqual(['climb_per_ride_m']);
    // Same draws as a stored sample would hold (seed 0, 2000 draws): such versions answer as new ones would.
    expect(got.typicality).toBe(scoreRowPartial(fresh, [22, 100, null], { sample: typicalitySample(fresh) }).typicality);
  });
});


describe("the publisher's choice in the studio", () => {
  async function patchFields(modelId: number, fields: unknown) {
    const res = await patchModelRoute(await makeRequest(`/api/models/${modelId}`, { method: 'PATCH', userId: ws.owner.id, json: { fields } }), { params: Promise.resolve({ id: String(modelId) }) });
    return { status: res.status, json: await res.json() };
  }

  it('saves "may be left blank" per field, keeps fields sent without the choice required, and refuses anything but true or false', async () => {
    const model = await createModel(ws.workspace.id, ws.owner.id, 3, 'Studio choice');
    const plain = model.fields.map(({ optional: _o, ...f }) => f);
    const saved = await patchFields(model.id, plain);
    expect(saved.status).toBe(200);
    expect(saved.json.model.fields.map((f: { optional: boolean }) => f.optional)).toEqual([false, false, false]);

    const bad = await patchFields(model.id, plain.map((f, j) => (j === 1 ? { ...f, optional: 'yes' } : f)));
    expect(bad.status).toBe(422);
    expect(bad.json.error.issues.map((i: { field: string }) => i.field)).toContain('fields.1.optional');

    const chosen = await patchFields(model.id, plain.map((f, j) => ({ ...f, optional: j === 0 })));
    expect(chosen.status).toBe(200);
    expect(((await MixtureModel.findByPk(model.id))!.fields).map((f) => f.optional)).toEqual([true, false, false]);

    // Published, the choice holds: speed may be left blank, distance may not.
    const t = (await publishNew(acting, { mixtureModelId: model.id, title: 'Studio choice' })).embed.token;
    const got = await answer({ weekly_distance_km: 130, climb_per_ride_m: 420 }, t);
    expect(got.unused).toEqual(['avg_speed_kmh']);
    const refused = await post({ avg_speed_kmh: 25, climb_per_ride_m: 420 }, t);
    expect(refused.status).toBe(422);
    expect((await refused.json()).error.issues).toEqual([{ field: 'values.weekly_distance_km', message: 'Weekly distance is needed for this calculator.' }]);
  });
});

/**
 * Cross-workspace: the owner of workspace B guesses workspace A's ids — in the path, in
 * the body, and with a forged workspace cookie. Every attempt must answer 404 (or fall
 * back to B's own data), reveal nothing of A, and change no table. The role × route
 * matrix checks each route's status per caller; this adds real ids on destructive
 * routes (the matrix uses absent ones there), ids carried in bodies, and the cookie.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import * as datasetRoute from '@/app/api/datasets/[id]/route';
import { GET as datasetsGET } from '@/app/api/datasets/route';
import { POST as fitsPOST, GET as fitsGET } from '@/app/api/fits/route';
import { POST as fitCancelPOST } from '@/app/api/fits/[id]/cancel/route';
import { GET as fitGET } from '@/app/api/fits/[id]/route';
import { POST as modelsPOST, GET as modelsGET } from '@/app/api/models/route';
import * as modelRoute from '@/app/api/models/[id]/route';
import { GET as modelDownloadGET } from '@/app/api/models/[id]/download/route';
import { POST as embedsPOST, GET as embedsGET } from '@/app/api/embeds/route';
import { PATCH as embedPATCH } from '@/app/api/embeds/[id]/route';
import { GET as versionsGET, POST as versionsPOST } from '@/app/api/embeds/[id]/versions/route';
import { PUT as activeVersionPUT } from '@/app/api/embeds/[id]/active-version/route';
import { POST as rotatePOST } from '@/app/api/embeds/[id]/rotate/route';
import { POST as retirePOST } from '@/app/api/embeds/[id]/retire/route';
import { Embed, MixtureModel } from '@/models';
import { buildWorld } from '../matrix/world';
import type { World } from '../matrix/types';
import { makeRequest } from '../../helpers/auth';
import { changedTables, fingerprint } from './snapshot';

let w: World;
/** An embed of workspace B's own, so cross-embed version ids can be tried. */
let ownEmbedId: number;

// eslint-disable-next-line @typescript-eslint/no-explicit-any
type AnyHandler = (request: Request, context: any) => Promise<Response> | Response;
interface Attempt {
  name: string;
  handler: AnyHandler;
  method: string;
  url: (w: World) => string;
  id?: (w: World) => number;
  body?: (w: World) => unknown;
  /** The outsider sends a workspace cookie naming A (forged). */
  forgedCookie?: boolean;
}

const id = (f: (w: World) => number) => f;
const ATTEMPTS: Attempt[] = [
  { name: 'read A dataset', handler: datasetRoute.GET, method: 'GET', url: (w) => `/api/datasets/${w.datasetId}`, id: id((w) => w.datasetId) },
  { name: 'rename A dataset', handler: datasetRoute.PATCH, method: 'PATCH', url: (w) => `/api/datasets/${w.datasetId}`, id: id((w) => w.datasetId), body: () => ({ name: 'Mine now' }) },
  { name: 'delete A dataset (real id)', handler: datasetRoute.DELETE, method: 'DELETE', url: (w) => `/api/datasets/${w.datasetId}`, id: id((w) => w.datasetId) },
  { name: 'read A fit', handler: fitGET, method: 'GET', url: (w) => `/api/fits/${w.fitId}`, id: id((w) => w.fitId) },
  { name: 'cancel A fit', handler: fitCancelPOST, method: 'POST', url: (w) => `/api/fits/${w.fitId}/cancel`, id: id((w) => w.fitId) },
  { name: 'fit A dataset (id in the body)', handler: fitsPOST, method: 'POST', url: () => '/api/fits', body: (w) => ({ datasetId: w.datasetId, features: ['avg_speed_kmh', 'weekly_distance_km'], maxComponents: 2 }) },
  { name: 'name a model from A fit (id in the body)', handler: modelsPOST, method: 'POST', url: () => '/api/models', body: (w) => ({ fitId: w.fitId, candidate: 0, name: 'Stolen' }) },
  { name: 'read A model', handler: modelRoute.GET, method: 'GET', url: (w) => `/api/models/${w.modelId}`, id: id((w) => w.modelId) },
  { name: 'relabel A model', handler: modelRoute.PATCH, method: 'PATCH', url: (w) => `/api/models/${w.modelId}`, id: id((w) => w.modelId), body: () => ({ name: 'Renamed' }) },
  { name: 'download A model', handler: modelDownloadGET, method: 'GET', url: (w) => `/api/models/${w.modelId}/download`, id: id((w) => w.modelId) },
  { name: 'publish A model (id in the body)', handler: embedsPOST, method: 'POST', url: () => '/api/embeds', body: (w) => ({ mixtureModelId: w.modelId }) },
  { name: 'change A calculator', handler: embedPATCH, method: 'PATCH', url: (w) => `/api/embeds/${w.embedId}`, id: id((w) => w.embedId), body: () => ({ theme: 'dark' }) },
  { name: 'list A calculator versions', handler: versionsGET, method: 'GET', url: (w) => `/api/embeds/${w.embedId}/versions`, id: id((w) => w.embedId) },
  { name: 'publish a version to A calculator', handler: versionsPOST, method: 'POST', url: (w) => `/api/embeds/${w.embedId}/versions`, id: id((w) => w.embedId), body: () => ({ activate: true }) },
  { name: 'point A calculator at a version', handler: activeVersionPUT, method: 'PUT', url: (w) => `/api/embeds/${w.embedId}/active-version`, id: id((w) => w.embedId), body: (w) => ({ versionId: w.versionId }) },
  { name: "point B's own calculator at A's version", handler: activeVersionPUT, method: 'PUT', url: () => `/api/embeds/${ownEmbedId}/active-version`, id: id(() => ownEmbedId), body: (w) => ({ versionId: w.versionId }) },
  { name: 'rotate A calculator token (real id)', handler: rotatePOST, method: 'POST', url: (w) => `/api/embeds/${w.embedId}/rotate`, id: id((w) => w.embedId) },
  { name: 'retire A calculator (real id)', handler: retirePOST, method: 'POST', url: (w) => `/api/embeds/${w.embedId}/retire`, id: id((w) => w.embedId) },
];

beforeAll(async () => {
  w = await buildWorld();
  const own = await MixtureModel.create({ workspaceId: w.otherWorkspaceId, createdById: w.users.outsider.id, name: 'B model', model: (await MixtureModel.findByPk(w.modelId))!.model, clusters: [], fields: [] });
  ownEmbedId = (await Embed.create({ workspaceId: w.otherWorkspaceId, mixtureModelId: own.id, token: 'OutsiderOwnToken_abcdefgh', title: 'B calc', allowedOrigins: [] })).id;
});

describe("the owner of workspace B cannot reach workspace A's records by id", () => {
  for (const forgedCookie of [false, true]) {
    for (const a of ATTEMPTS) {
      it(`${a.name}${forgedCookie ? ' (with a forged workspace cookie naming A)' : ''} → 404, nothing changed`, async () => {
        const before = await fingerprint();
        const request = await makeRequest(a.url(w), { method: a.method, userId: w.users.outsider.id, workspaceId: forgedCookie ? w.workspaceId : w.otherWorkspaceId, json: a.body?.(w) });
        const res = await a.handler(request, { params: Promise.resolve(a.id ? { id: String(a.id(w)) } : {}) });
        const text = await res.text();
        expect(res.status, text).toBe(404);
        // Nothing about A leaks into the refusal.
        for (const secret of ['Rides', 'Ride groups', w.embedToken, 'Matrix A']) expect(text).not.toContain(secret);
        expect(changedTables(before, await fingerprint())).toEqual([]);
      });
    }
  }

  it("lists show only B's own records, even with a forged cookie", async () => {
    const lists: [AnyHandler, string, string][] = [
      [datasetsGET, '/api/datasets', 'datasets'],
      [fitsGET, '/api/fits', 'fits'],
      [modelsGET, '/api/models', 'models'],
      [embedsGET, '/api/embeds', 'embeds'],
    ];
    for (const [handler, url, key] of lists) {
      const res = await handler(await makeRequest(url, { userId: w.users.outsider.id, workspaceId: w.workspaceId }), { params: Promise.resolve({}) });
      expect(res.status).toBe(200);
      const body = (await res.json()) as Record<string, { id: number; workspaceId?: number }[]>;
      const ids = body[key].map((r) => r.id);
      const aIds = { datasets: w.datasetId, fits: w.fitId, models: w.modelId, embeds: w.embedId } as Record<string, number>;
      if (key !== 'embeds' && key !== 'models') expect(ids).not.toContain(aIds[key]);
      if (key === 'models') expect(body[key].map((m) => (m as unknown as { name: string }).name)).toEqual(['B model']);
      if (key === 'embeds') expect(ids).toEqual([ownEmbedId]);
    }
  });
});

/**
 * The worked example of the README ("Automating with the API"), run as a user runs it:
 * scripts/examples/nightly-refit.ts as a child process with tsx, against an app server
 * of this test's own, with a key stored in that server's database the way the studio
 * stores one. The new version must end up served, made by the key (no person), with
 * every call audited.
 */
import { spawn } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { generateApiKey } from '@/lib/auth/api-key-format';
import { demoRidesCsv } from '@/lib/demo/cycling';
import { openSequelize } from '@/models/db';
import { prepareDatabase, queryApp, startApp, type AppProcess } from '../helpers/app-process';

let app: AppProcess | undefined;
let csvPath = '';
let calculatorId = 0;
let versionsBefore = 0;

const sql = <T extends object>(text: string) => queryApp<T>(app!, text);

/** Store a key in the server's database as lib/auth/api-keys.ts would (prefix + SHA-256 only). */
async function storeKey(workspaceId: number, scopes: string[], revoked = false): Promise<{ key: string; id: number }> {
  const { key, prefix, secretHash } = generateApiKey();
  const db = openSequelize(app!.databasePath);
  try {
    const now = new Date();
    await db.query('INSERT INTO api_keys (workspace_id, name, prefix, secret_hash, scopes, revoked_at, created_at, updated_at) VALUES (?, ?, ?, ?, ?, ?, ?, ?)', {
      replacements: [workspaceId, 'Nightly re-fit', prefix, secretHash, JSON.stringify(scopes), revoked ? now : null, now, now],
    });
  } finally {
    await db.close();
  }
  const [row] = await sql<{ id: number }>(`SELECT id FROM api_keys WHERE prefix = '${prefix}'`);
  return { key, id: row.id };
}

function runScript(env: Record<string, string>): Promise<{ code: number | null; out: string; err: string }> {
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, ['--import', 'tsx', 'scripts/examples/nightly-refit.ts', csvPath], { env: Object.assign({}, process.env, env), stdio: ['ignore', 'pipe', 'pipe'] });
    let out = '';
    let err = '';
    child.stdout!.on('data', (d: Buffer) => (out += d));
    child.stderr!.on('data', (d: Buffer) => (err += d));
    child.on('error', reject);
    child.on('exit', (code) => resolve({ code, out, err }));
  });
}

beforeAll(async () => {
  const { dir, env } = await prepareDatabase('nightly-refit');
  app = await startApp(dir, env);
  csvPath = path.join(dir, 'rides-tonight.csv');
  fs.writeFileSync(csvPath, demoRidesCsv(49));
  const [calc] = await sql<{ id: number }>("SELECT id FROM embeds WHERE status = 'active' ORDER BY id LIMIT 1");
  calculatorId = calc.id;
  versionsBefore = (await sql<{ n: number }>(`SELECT COUNT(*) AS n FROM model_versions WHERE embed_id = ${calculatorId}`))[0].n;
});

afterAll(async () => {
  await app?.stop();
});

describe('scripts/examples/nightly-refit.ts against a running server', () => {
  it('uploads, fits, waits, ranks, keeps and names a model, publishes a new version of the calculator and serves it', async () => {
    const [{ workspace_id: workspaceId }] = await sql<{ workspace_id: number }>(`SELECT workspace_id FROM embeds WHERE id = ${calculatorId}`);
    const { key, id: keyId } = await storeKey(workspaceId, ['read', 'fit', 'publish']);
    const result = await runScript({ PARTWISE_URL: app!.url, PARTWISE_API_KEY: key, PARTWISE_CALCULATOR_ID: String(calculatorId), PARTWISE_MAX_COMPONENTS: '3', PARTWISE_CLUSTER_NAMES: 'Tourers,Climbers,Racers' });
    expect(result.code, `${result.out}\n${result.err}\n--- server ---\n${app!.log().slice(-2000)}`).toBe(0);
    for (let n = 1; n <= 9; n++) expect(result.out).toMatch(new RegExp(`^${n}\\. `, 'm'));

    const done = /Done: calculator (\d+) serves version id (\d+)\./.exec(result.out);
    expect(done, result.out).not.toBeNull();
    expect(Number(done![1])).toBe(calculatorId);
    const versionId = Number(done![2]);

    const [embed] = await sql<{ active_version_id: number }>(`SELECT active_version_id FROM embeds WHERE id = ${calculatorId}`);
    expect(embed.active_version_id).toBe(versionId);
    const [version] = await sql<{ number: number; created_by_id: number | null; mixture_model_id: number }>(`SELECT number, created_by_id, mixture_model_id FROM model_versions WHERE id = ${versionId}`);
    expect(version.number).toBe(versionsBefore + 1);
    expect(version.created_by_id).toBeNull();
    const [model] = await sql<{ clusters: string; fit_id: number }>(`SELECT clusters, fit_id FROM mixture_models WHERE id = ${version.mixture_model_id}`);
    const labels = (JSON.parse(model.clusters) as { label: string }[]).map((c) => c.label);
    expect(labels.slice(0, 3).filter((l) => ['Tourers', 'Climbers', 'Racers'].includes(l)).length).toBe(Math.min(3, labels.length));

    // The served calculator answers with the new version.
    const [{ token }] = await sql<{ token: string }>(`SELECT token FROM embeds WHERE id = ${calculatorId}`);
    const scored = await fetch(`${app!.url}/api/score/${token}`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ values: { avg_speed_kmh: 26, weekly_distance_km: 150, climb_per_ride_m: 500 } }) });
    expect(scored.status).toBe(200);
    expect((await scored.json()).version).toBe(versionsBefore + 1);

    // Every call of the script is in the audit trail under the key.
    const uses = await sql<{ detail: string; actor_email: string; actor_user_id: number | null }>(`SELECT detail, actor_email, actor_user_id FROM audit_events WHERE action = 'api_key.use' AND target_id = '${keyId}'`);
    const paths = uses.map((u) => JSON.parse(u.detail) as { method: string; path: string }).map((d) => `${d.method} ${d.path}`);
    expect(paths).toEqual(expect.arrayContaining(['POST /api/v1/datasets', 'POST /api/v1/fits', `GET /api/v1/fits/${model.fit_id}/ranking`, 'POST /api/v1/models', `POST /api/v1/calculators/${calculatorId}/versions`, `PUT /api/v1/calculators/${calculatorId}/served-version`, 'GET /api/v1/usage']));
    expect(uses.every((u) => u.actor_user_id === null && u.actor_email.startsWith('API key "Nightly re-fit"'))).toBe(true);
  });

  it('stops at the first refusal with the server’s words and changes nothing (a revoked key)', async () => {
    const [{ workspace_id: workspaceId }] = await sql<{ workspace_id: number }>(`SELECT workspace_id FROM embeds WHERE id = ${calculatorId}`);
    const { key } = await storeKey(workspaceId, ['read', 'fit', 'publish'], true);
    const [{ n: before }] = await sql<{ n: number }>('SELECT COUNT(*) AS n FROM datasets');
    const result = await runScript({ PARTWISE_URL: app!.url, PARTWISE_API_KEY: key, PARTWISE_CALCULATOR_ID: String(calculatorId) });
    expect(result.code).toBe(1);
    expect(result.err).toMatch(/POST \/api\/v1\/datasets.* answered 401: This API key was revoked/);
    expect((await sql<{ n: number }>('SELECT COUNT(*) AS n FROM datasets'))[0].n).toBe(before);
  });
});

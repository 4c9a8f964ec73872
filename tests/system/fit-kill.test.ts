/**
 * Fault: the server process is killed (SIGKILL, no chance to clean up) while a fit runs.
 * After a restart on the same database the job ends failed with a reason the analyst can
 * act on, nothing else is lost, and new fits run to the end.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_USERS } from '@/lib/demo/accounts';
import { RESTART_REASON } from '@/lib/fitting/jobs';
import { prepareDatabase, queryApp, startApp, SYSTEM_SECRET, type AppProcess } from '../helpers/app-process';

let app: AppProcess | undefined;
let cookie = '';
let datasetId = 0;
let features: string[] = [];

const query = <T extends object>(sql: string) => queryApp<T>(app!, sql);

async function api(path: string, init: RequestInit = {}) {
  const res = await fetch(`${app!.url}${path}`, { ...init, headers: { cookie, 'content-type': 'application/json', origin: app!.url, ...(init.headers ?? {}) } });
  return { status: res.status, body: (await res.json()) as { fit?: { id: number; status: string; error: string | null; progress: { fraction?: number } | null } } };
}

async function waitForFit(id: number, done: (fit: { status: string; progress: { fraction?: number } | null }) => boolean, timeoutMs = 90_000) {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const { body } = await api(`/api/fits/${id}`);
    if (body.fit && done(body.fit)) return body.fit;
    if (Date.now() > deadline) throw new Error(`fit ${id} did not get there in time: ${JSON.stringify(body.fit)}`);
    await new Promise((r) => setTimeout(r, 200));
  }
}

beforeAll(async () => {
  const { dir, env } = await prepareDatabase('fit-kill');
  app = await startApp(dir, env);
  process.env.NEXTAUTH_SECRET = SYSTEM_SECRET;
  const [analyst] = await query<{ id: number; session_generation: number }>(`SELECT id, session_generation FROM users WHERE email = '${DEMO_USERS.member.email}'`);
  const [dataset] = await query<{ id: number; workspace_id: number; columns: string }>('SELECT id, workspace_id, columns FROM datasets ORDER BY id LIMIT 1');
  datasetId = dataset.id;
  features = (JSON.parse(dataset.columns) as { name: string; kind: string }[]).filter((c) => c.kind === 'numeric').map((c) => c.name).slice(0, 3);
  const { sessionCookie } = await import('../helpers/auth');
  cookie = await sessionCookie(analyst.id, dataset.workspace_id, { generation: analyst.session_generation });
});

afterAll(async () => {
  await app?.stop('SIGTERM');
});

describe('a server killed during a fit', () => {
  it('leaves the job failed with its reason after the restart, and fits run again', async () => {
    const started = await api('/api/fits', {
      method: 'POST',
      body: JSON.stringify({ datasetId, features, minComponents: 1, maxComponents: 10, covariances: ['full', 'diagonal', 'spherical', 'tied'], restarts: 10, seed: 3, maxIter: 1000, tol: 1e-7 }),
    });
    expect(started.status).toBe(202);
    const id = started.body.fit!.id;
    await waitForFit(id, (f) => f.status === 'running' && (f.progress?.fraction ?? 0) > 0);

    expect(await app!.stop('SIGKILL')).toBeNull();
    const [row] = await query<{ status: string }>(`SELECT status FROM fits WHERE id = ${id}`);
    expect(row.status, 'nothing could mark it on the way down').toBe('running');
    const modelsBefore = await query<{ n: number }>('SELECT COUNT(*) AS n FROM mixture_models');

    app = await app!.restart();
    const after = await api(`/api/fits/${id}`);
    expect(after.body.fit).toMatchObject({ status: 'failed', error: RESTART_REASON });
    expect(await query<{ n: number }>('SELECT COUNT(*) AS n FROM mixture_models')).toEqual(modelsBefore);
    expect(app.log()).toMatch(/1 fit job\(s\) were interrupted by a restart/);

    const again = await api('/api/fits', { method: 'POST', body: JSON.stringify({ datasetId, features, minComponents: 2, maxComponents: 3, covariances: ['full'], restarts: 2, seed: 4 }) });
    expect(again.status).toBe(202);
    const finished = await waitForFit(again.body.fit!.id, (f) => f.status !== 'queued' && f.status !== 'running');
    expect(finished.status).toBe('succeeded');
  });
});

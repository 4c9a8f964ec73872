import http from 'node:http';
import { flushUsage, pendingAnswers } from '@/lib/usage';
import { recordListenHost } from '@/lib/mail/dev';
import { settleForwarding, trustsProxy } from './forwarding';
import { productionSettingProblems } from './settings';
import { jsonForBareApiErrors, settleMalformedPath } from './odd-requests';
import { ensureLocalSecret, localSecretPath } from '@/lib/auth/local-secret';
import { answerScore, scoringToken } from './score-fast-path';
import { startBroadcast, stopBroadcast } from '@/lib/shared/broadcast';
import { connectRedis, redisUrl } from '@/lib/shared/redis';

/**
 * The production HTTP server: Next's request handler behind a node:http server that
 * settles forwarded headers for every request and answers the public scoring route
 * itself (see score-fast-path.ts). On SIGTERM/SIGINT it stops accepting, lets requests
 * in flight finish, writes the usage counts still in memory, and exits.
 */
export interface AppServerOptions {
  port: number;
  host: string;
  dev?: boolean;
}

export async function startAppServer({ port, host, dev = false }: AppServerOptions): Promise<http.Server> {
  prepareLocalSecret();
  const problems = dev ? [] : productionSettingProblems();
  if (problems.length) {
    throw new Error(`the production server is not configured:\n${problems.map((p) => `  - ${p}`).join('\n')}`);
  }
  const { default: next } = await import('next');
  const app = next({ dev, hostname: host, port, dir: process.cwd() });
  const handle = app.getRequestHandler();
  await app.prepare();

  // Read once: a proxy in front is a deployment fact, not something that changes per request.
  const trustProxy = trustsProxy();
  const server = http.createServer((req, res) => {
    const client = settleForwarding(req, trustProxy);
    // Broken %-escapes never reach Next's router (its param decoding threw on them).
    if (settleMalformedPath(req, res)) return;
    // `next dev` recompiles the route on edits; the fast path would keep serving the old code.
    const token = dev ? null : scoringToken(req);
    if (token === null) jsonForBareApiErrors(req, res);
    const work = token !== null ? answerScore(req, res, token, client) : handle(req, res);
    Promise.resolve(work).catch((error) => {
      console.error('[partwise] request failed:', req.method, req.url, error);
      if (!res.headersSent) res.writeHead(500, { 'Content-Type': 'application/json' });
      res.end(JSON.stringify({ error: { code: 'internal', message: 'Something went wrong on our side. Please try again.' } }));
    });
  });
  // Hear other instances' cache invalidations (Redis or PostgreSQL; nothing on SQLite) before answering.
  await listenForInvalidations();
  await registerQueueHealth();
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(port, host, () => resolve());
  });
  // Pages that must exist only on loopback-only runs (the local mail sink) read the address actually bound.
  const bound = server.address();
  recordListenHost(typeof bound === 'object' && bound ? bound.address : host);

  let stopping = false;
  const stop = async (signal: string) => {
    if (stopping) return;
    stopping = true;
    console.log(`[partwise] ${signal}: stopping; ${pendingAnswers()} answer count(s) to write`);
    server.close();
    server.closeIdleConnections();
    // Requests in flight get a moment; a stuck one must not keep the counts from disk.
    // (A held timer: with the listener closed, an unref'd one let node exit here, unflushed, with code 0.)
    await new Promise((r) => setTimeout(r, 500));
    server.closeAllConnections();
    await stopBroadcast().catch(() => {});
    try {
      await flushUsage();
    } catch (e) {
      console.error('[partwise] could not write the last usage counts:', (e as Error).message);
      process.exit(1);
    }
    process.exit(0);
  };
  process.on('SIGTERM', () => void stop('SIGTERM'));
  process.on('SIGINT', () => void stop('SIGINT'));
  return server;
}

/** A local run without NEXTAUTH_SECRET signs sessions with the random secret file of its data directory; make it on the first run. */
function prepareLocalSecret() {
  if (process.env.PARTWISE_LOCAL !== '1' || process.env.NEXTAUTH_SECRET || process.env.AUTH_SECRET) return;
  const file = localSecretPath();
  const { action, reason } = ensureLocalSecret(file);
  if (action === 'created') console.log(`[partwise] local run: made a random session secret in ${file} (owner-only).`);
  if (action === 'replaced') console.warn(`[partwise] local run: ${reason} A new secret replaced it; everyone signs in again.`);
}

/** The listener retries in the background; a start does not wait more than a few seconds for it. */
async function listenForInvalidations(): Promise<void> {
  // Shared rate limits count in Redis from the first answer (not in the fallback while connecting).
  if (redisUrl() && !(await connectRedis())) console.error('[partwise] Redis (REDIS_URL) does not answer yet; rate limits count per instance until it does.');
  let timer: NodeJS.Timeout | undefined;
  try {
    const transport = await Promise.race([
      startBroadcast(),
      new Promise<never>((_, reject) => (timer = setTimeout(() => reject(new Error('no answer within 5 s')), 5000))),
    ]);
    if (transport) console.log(`[partwise] cache invalidations shared through ${transport === 'redis' ? 'Redis' : 'PostgreSQL'}`);
  } catch (e) {
    console.error('[partwise] cannot listen for other instances\' cache invalidations yet:', (e as Error).message);
  } finally {
    clearTimeout(timer);
  }
}

/** With a fit queue configured, /api/health reports it as its own part (loaded only then: pg-boss is optional). */
async function registerQueueHealth(): Promise<void> {
  const { queueConfigured, queueHealth } = await import('@/lib/fitting/fit-queue');
  if (!queueConfigured()) return;
  const { registerHealthCheck } = await import('@/lib/health');
  registerHealthCheck('queue', async () => {
    const state = await queueHealth();
    return state && { ok: state.ok, detail: state.detail };
  });
}


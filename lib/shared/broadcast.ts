import { randomUUID } from 'node:crypto';
import pg from 'pg';
import Redis from 'ioredis';
import { databaseDialect, databasePath, getSequelize } from '@/models/db';
import { redisClient, redisSubscriber, redisUrl } from './redis';

/**
 * Cache invalidations that must reach every app instance within a second: a calculator
 * disabled by staff, a token rotated, a version retired, a workspace's allowance changed.
 * The functions that clear this process's caches (lib/scoring: invalidateEmbed,
 * invalidateWorkspace, invalidateAllowance) also `announce` what they cleared; every
 * other process hears it and clears the same entry through the handler registered with
 * `onInvalidation` — the handler clears locally only, so nothing heard is announced again,
 * and a process ignores its own announcements (each message carries the sender's id).
 *
 * The channel, by what is configured:
 *   - REDIS_URL: Redis pub/sub on channel `partwise:invalidate` (ioredis).
 *   - else DATABASE_URL on PostgreSQL: LISTEN/NOTIFY on `partwise_invalidate`, through a
 *     dedicated `pg` client (announcing goes through the ordinary pool: pg_notify).
 *   - else (SQLite, one process): nothing extra; the local clear is all there is.
 * A process that (re)connects its listener clears all its caches first, since it may
 * have missed announcements while it was away. The caches' own short lifetimes
 * (PARTWISE_EMBED_CACHE_MS) remain the backstop.
 */
export type InvalidationKind = 'embed' | 'workspace' | 'allowance';
export interface Invalidation {
  kind: InvalidationKind;
  /** Embed token or id; workspace id; `null` = everything of that kind. */
  key: string | number | null;
}
interface Wire extends Invalidation {
  from: string;
}

export const REDIS_CHANNEL = 'partwise:invalidate';
export const PG_CHANNEL = 'partwise_invalidate';

type Handler = (message: Invalidation) => void;
interface State {
  id: string;
  handlers: Map<InvalidationKind, Set<Handler>>;
  listener: { transport: 'redis' | 'postgres'; close(): Promise<void> } | null;
  heard: number;
}
const state: State = ((globalThis as Record<symbol, unknown>)[Symbol.for('partwise.broadcast')] ??= {
  id: randomUUID(),
  handlers: new Map(),
  listener: null,
  heard: 0,
}) as State;

/** Register what to clear when another process announces an invalidation (clear locally only). */
export function onInvalidation(kind: InvalidationKind, handler: Handler): void {
  let set = state.handlers.get(kind);
  if (!set) state.handlers.set(kind, (set = new Set()));
  set.add(handler);
}

/** Which channel this process would use, from the environment. */
export function broadcastTransport(): 'redis' | 'postgres' | null {
  if (redisUrl()) return 'redis';
  try {
    return databaseDialect(databasePath()) === 'postgres' ? 'postgres' : null;
  } catch {
    return null;
  }
}

/** Tell the other processes; fire and forget (a lost message leaves the cache's short lifetime). */
export function announce(message: Invalidation): void {
  const transport = broadcastTransport();
  if (!transport) return;
  const wire = JSON.stringify({ ...message, from: state.id } satisfies Wire);
  const failed = (e: unknown) => console.error('[partwise] could not announce a cache invalidation:', (e as Error).message);
  try {
    if (transport === 'redis' && state.listener) redisClient()!.publish(REDIS_CHANNEL, wire).catch(failed);
    else if (transport === 'redis') {
      // A process that does not listen (a CLI tool, the seed): a connection of its own for
      // this one message, closed after, so it does not keep the process alive.
      const once = new Redis(redisUrl()!, { maxRetriesPerRequest: 1, retryStrategy: () => null, lazyConnect: false });
      once.on('error', () => {});
      once
        .publish(REDIS_CHANNEL, wire)
        .catch(failed)
        .finally(() => once.quit().catch(() => once.disconnect()));
    }
    else getSequelize().query('SELECT pg_notify(?, ?)', { replacements: [PG_CHANNEL, wire], transaction: null }).catch(failed);
  } catch (e) {
    failed(e);
  }
}

function deliver(raw: string): void {
  let message: Wire;
  try {
    message = JSON.parse(raw) as Wire;
  } catch {
    return;
  }
  if (message.from === state.id) return;
  state.heard++;
  runHandlers(message);
}

function runHandlers(message: Invalidation): void {
  for (const handler of state.handlers.get(message.kind) ?? []) {
    try {
      handler(message);
    } catch (e) {
      console.error('[partwise] a cache invalidation handler failed:', (e as Error).message);
    }
  }
}

/** Everything may be stale after a gap in listening. */
function clearEverything(): void {
  for (const kind of ['embed', 'workspace', 'allowance'] as const) runHandlers({ kind, key: null });
}

/**
 * Start listening (once per process; app server start and instrumentation call it).
 * Resolves when the subscription is in place, so a started instance hears everything after.
 */
export async function startBroadcast(): Promise<'redis' | 'postgres' | null> {
  if (state.listener) return state.listener.transport;
  const transport = broadcastTransport();
  if (transport === 'redis') {
    const sub = redisSubscriber(redisUrl()!);
    sub.on('message', (_channel, raw: string) => deliver(raw));
    let first = true;
    sub.on('ready', () => {
      if (!first) clearEverything();
      first = false;
    });
    state.listener = { transport, close: async () => void (await sub.quit().catch(() => sub.disconnect())) };
    await sub.subscribe(REDIS_CHANNEL);
    return transport;
  }
  if (transport === 'postgres') {
    let client: pg.Client | null = null;
    let closed = false;
    const listen = async (again: boolean) => {
      const c = new pg.Client({ connectionString: databasePath() });
      c.on('error', (e) => {
        console.error('[partwise] invalidation listener lost its PostgreSQL connection:', e.message);
        c.end().catch(() => {});
        if (!closed && client === c) setTimeout(() => void listen(true).catch(() => {}), 1000).unref();
      });
      c.on('notification', (n) => {
        if (n.channel === PG_CHANNEL && n.payload) deliver(n.payload);
      });
      client = c;
      try {
        await c.connect();
        await c.query(`LISTEN ${PG_CHANNEL}`);
      } catch (e) {
        c.end().catch(() => {});
        if (!closed) setTimeout(() => void listen(true).catch(() => {}), 1000).unref();
        throw e;
      }
      if (again) clearEverything();
    };
    state.listener = {
      transport,
      close: async () => {
        closed = true;
        await client?.end().catch(() => {});
      },
    };
    await listen(false);
    return transport;
  }
  return null;
}

/** Stop listening (shutdown, tests). */
export async function stopBroadcast(): Promise<void> {
  const l = state.listener;
  state.listener = null;
  await l?.close();
}

/** For /api/health and tests: the channel in use and how many announcements were heard. */
export function broadcastState(): { transport: 'redis' | 'postgres' | null; listening: boolean; heard: number } {
  return { transport: state.listener?.transport ?? broadcastTransport(), listening: state.listener !== null, heard: state.heard };
}

import Redis from 'ioredis';

/**
 * The optional Redis of a deployment with more than one app instance (REDIS_URL, e.g.
 * redis://host:6379/0): shared rate-limit counts (lib/rate-limit) and the invalidation
 * channel (lib/shared/broadcast). Unset: every process keeps its own, as on one machine.
 *
 * One command connection per process (kept on globalThis, so the app server and Next's
 * bundles share it); pub/sub needs a connection of its own (`redisSubscriber`).
 */
export function redisUrl(): string | null {
  const url = (process.env.REDIS_URL ?? '').trim();
  if (!url) return null;
  if (!/^rediss?:\/\//i.test(url)) throw new Error('REDIS_URL must be a redis:// or rediss:// address (e.g. redis://127.0.0.1:6379/0).');
  return url;
}

type Held = { url: string; client: Redis };
const held = globalThis as unknown as { __partwiseRedis?: Held };

function connect(url: string, purpose: string): Redis {
  const client = new Redis(url, {
    // A command waits for a reconnect at most this long, then fails (the caller decides what that means).
    maxRetriesPerRequest: 2,
    enableOfflineQueue: true,
    connectionName: `partwise-${purpose}-${process.pid}`,
    retryStrategy: (times) => Math.min(times * 200, 2000),
  });
  let warned = false;
  client.on('error', (e) => {
    if (warned) return;
    warned = true;
    console.error(`[partwise] Redis (${purpose}):`, (e as Error).message);
  });
  client.on('ready', () => (warned = false));
  return client;
}

/** The process's command connection, or null without REDIS_URL. */
export function redisClient(): Redis | null {
  const url = redisUrl();
  if (!url) return null;
  if (held.__partwiseRedis?.url !== url) {
    held.__partwiseRedis?.client.disconnect();
    held.__partwiseRedis = { url, client: connect(url, 'commands') };
  }
  return held.__partwiseRedis.client;
}

/** A new connection for SUBSCRIBE (a subscribed connection can run no other command). */
export function redisSubscriber(url: string): Redis {
  return connect(url, 'subscriber');
}

/** For /api/health: null when Redis is not configured. */
export async function redisHealth(): Promise<{ ok: boolean; error?: string } | null> {
  let client: Redis | null;
  try {
    client = redisClient();
  } catch (e) {
    return { ok: false, error: (e as Error).message };
  }
  if (!client) return null;
  try {
    const pong = await Promise.race([client.ping(), new Promise<never>((_, reject) => setTimeout(() => reject(new Error('timed out')), 2000).unref())]);
    return pong === 'PONG' ? { ok: true } : { ok: false, error: 'unexpected answer to PING' };
  } catch {
    return { ok: false, error: 'Redis cannot be reached' };
  }
}

/** Tests and shutdown: close the command connection. */
export async function closeRedis(): Promise<void> {
  const h = held.__partwiseRedis;
  held.__partwiseRedis = undefined;
  if (h) await h.client.quit().catch(() => h.client.disconnect());
}

/**
 * Connect the command connection now (server start), so the first answers count in Redis
 * rather than in the insurance limiter while the connection is still being made.
 */
export async function connectRedis(timeoutMs = 5000): Promise<boolean> {
  const client = redisClient();
  if (!client) return false;
  if (client.status === 'ready') return true;
  let timer: NodeJS.Timeout | undefined;
  try {
    await Promise.race([client.ping(), new Promise<never>((_, reject) => (timer = setTimeout(() => reject(new Error('timed out')), timeoutMs)))]);
    return true;
  } catch {
    return false;
  } finally {
    clearTimeout(timer);
  }
}

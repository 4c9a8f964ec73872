import { randomUUID } from 'node:crypto';
import Redis from 'ioredis';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { consumeLimit, consumeLimits, rateLimitTesting, sharedLimits } from '@/lib/rate-limit';
import { closeRedis, connectRedis } from '@/lib/shared/redis';
import { announce, broadcastState, onInvalidation, PG_CHANNEL, REDIS_CHANNEL, startBroadcast, stopBroadcast, type Invalidation } from '@/lib/shared/broadcast';
import { getSequelize } from '@/models/db';
import { testRedisUrl } from '../../helpers/redis';

/**
 * What several app instances share (lib/rate-limit's Redis store, lib/shared/broadcast).
 * The other instance is played by a raw connection: a Redis client counting in the same
 * keys or publishing on the channel, or a PostgreSQL NOTIFY from outside this process's listener.
 */
const heard: Invalidation[] = [];
onInvalidation('embed', (m) => heard.push(m));

const waitFor = async (what: () => boolean) => {
  for (let i = 0; i < 100 && !what(); i++) await new Promise((r) => setTimeout(r, 20));
  return what();
};

describe('rate limits through Redis (REDIS_URL)', () => {
  beforeAll(async () => {
    process.env.REDIS_URL = testRedisUrl();
    rateLimitTesting.clear();
    expect(await connectRedis()).toBe(true);
  });
  afterAll(async () => {
    delete process.env.REDIS_URL;
    rateLimitTesting.clear();
    await closeRedis();
  });

  it('counts one key in Redis, so a second client sees the same count', async () => {
    expect(sharedLimits()).toBe(true);
    const key = `t:${randomUUID()}`;
    const opts = { limit: 3, windowMs: 60_000 };
    expect((await Promise.all([1, 2, 3].map(() => consumeLimit(key, opts)))).map((r) => r.ok)).toEqual([true, true, true]);
    const refused = await consumeLimit(key, opts);
    expect(refused.ok).toBe(false);
    expect(refused.retryAfterSeconds).toBeGreaterThan(0);
    expect(refused.retryAfterSeconds).toBeLessThanOrEqual(60);
    // Another instance's view: the count lives in Redis under the limiter's prefix.
    const other = new Redis(testRedisUrl());
    try {
      expect(Number(await other.get(`partwise:rl:3:60000:${key}`))).toBeGreaterThanOrEqual(3);
    } finally {
      other.disconnect();
    }
  });

  it('takes every window or gives back what it took when one refuses', async () => {
    const id = randomUUID();
    const minute = { key: `m:${id}`, opts: { limit: 3, windowMs: 60_000 } };
    const hour = { key: `h:${id}`, opts: { limit: 5, windowMs: 3_600_000 } };
    for (let i = 0; i < 3; i++) expect((await consumeLimits([minute, hour])).ok).toBe(true);
    const refused = await consumeLimits([minute, hour]);
    expect(refused).toMatchObject({ ok: false, blocked: 0 });
    // The hour window got its point back: 3 of 5 used, not 4.
    const other = new Redis(testRedisUrl());
    try {
      expect(Number(await other.get(`partwise:rl:5:3600000:${hour.key}`))).toBe(3);
    } finally {
      other.disconnect();
    }
  });
});

describe('cache invalidations between instances', () => {
  afterEach(async () => {
    await stopBroadcast();
    delete process.env.REDIS_URL;
    await closeRedis();
    heard.length = 0;
  });

  it('over Redis: hears another instance, ignores its own announcements', async () => {
    process.env.REDIS_URL = testRedisUrl();
    expect(await startBroadcast()).toBe('redis');
    const before = broadcastState().heard;
    announce({ kind: 'embed', key: 'my-own-token' });
    const other = new Redis(testRedisUrl());
    try {
      await other.publish(REDIS_CHANNEL, JSON.stringify({ kind: 'embed', key: 'their-token', from: 'another-instance' }));
    } finally {
      other.disconnect();
    }
    expect(await waitFor(() => heard.length > 0)).toBe(true);
    await new Promise((r) => setTimeout(r, 100));
    expect(heard).toEqual([{ kind: 'embed', key: 'their-token', from: 'another-instance' }]);
    expect(broadcastState().heard).toBe(before + 1);
  });

  it.runIf(process.env.PARTWISE_TEST_DIALECT === 'postgres')('over PostgreSQL LISTEN/NOTIFY when there is no Redis', async () => {
    expect(await startBroadcast()).toBe('postgres');
    announce({ kind: 'embed', key: 'my-own-token' });
    await getSequelize().query('SELECT pg_notify(?, ?)', { replacements: [PG_CHANNEL, JSON.stringify({ kind: 'embed', key: 42, from: 'another-instance' })] });
    expect(await waitFor(() => heard.length > 0)).toBe(true);
    await new Promise((r) => setTimeout(r, 100));
    expect(heard).toEqual([{ kind: 'embed', key: 42, from: 'another-instance' }]);
  });

  it.runIf(process.env.PARTWISE_TEST_DIALECT !== 'postgres')('on SQLite without Redis: nothing to listen on', async () => {
    expect(await startBroadcast()).toBeNull();
    expect(broadcastState()).toMatchObject({ transport: null, listening: false });
  });
});

import { inject } from 'vitest';

/** The test Redis (tests/setup/redis-global.ts); throws rather than letting a test skip. */
export function testRedisUrl(): string {
  const url = process.env.PARTWISE_TEST_REDIS_URL || inject('redisUrl');
  if (!url) throw new Error('No test Redis: run through npm test, or let tests/setup/redis-global.ts start one');
  return url;
}

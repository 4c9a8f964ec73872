import type { TestProject } from 'vitest/node';
import { startRedis, type RunningRedis } from '../../scripts/lib/ensure-redis';

/**
 * Global setup of the integration projects: the Redis that `npm test` started
 * (PARTWISE_TEST_REDIS_URL), or a throwaway one of our own when a file is run alone.
 * Tests read it with `testRedisUrl()` (tests/helpers/redis.ts).
 */
declare module 'vitest' {
  export interface ProvidedContext {
    redisUrl: string;
  }
}

export default async function setup(project: TestProject) {
  let own: RunningRedis | undefined;
  let url = process.env.PARTWISE_TEST_REDIS_URL;
  if (!url) {
    // Its own port per project, so the two integration projects' servers do not meet.
    const base = 56_379 + (Number(process.env.PARTWISE_TEST_PORT ?? '3210') % 1000);
    own = await startRedis(base + (project.name === 'integration-pg' ? 1000 : 2000));
    url = own.url;
  }
  project.provide('redisUrl', url);
  return () => own?.stop();
}

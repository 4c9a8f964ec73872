import { startAppServer } from '@/lib/server/app-server';

/**
 * The app server process: `node --import tsx scripts/serve.ts [--dev] [-p PORT] [-H HOST]`.
 * Started by `npm start`, the test stack and the benchmarks (after migrations, seed and
 * the local service fakes are in place); see lib/server/app-server.ts.
 */
function arg(flags: string[], fallback: string): string {
  for (const f of flags) {
    const i = process.argv.indexOf(f);
    if (i > 0 && process.argv[i + 1]) return process.argv[i + 1];
  }
  return fallback;
}

const dev = process.argv.includes('--dev');
// Next reads NODE_ENV when it loads; the production server must never run as development.
(process.env as Record<string, string>).NODE_ENV = dev ? 'development' : 'production';
const port = Number(arg(['-p', '--port'], process.env.PORT ?? '3000'));
const host = arg(['-H', '--host'], process.env.HOST ?? '127.0.0.1');

startAppServer({ port, host, dev }).then(
  () => console.log(`[partwise] app server listening on http://${host}:${port}${dev ? ' (development)' : ''}`),
  (e) => {
    console.error(`[partwise] the app server could not start: ${e instanceof Error ? e.message : String(e)}`);
    process.exit(1);
  },
);

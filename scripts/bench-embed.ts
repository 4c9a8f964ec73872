import http from 'node:http';
import path from 'node:path';
import zlib from 'node:zlib';
import autocannon from 'autocannon';
import { BENCH_VALUES, benchAppEnv, ensureBuilt, freshDir, publishBenchCalculator, runBench, startBenchServer, stopGroup } from './lib/bench-server';
import { arg } from './lib/args';

/**
 * Calculator benchmark: `npx tsx scripts/bench-embed.ts [--duration 10] [--connections 64] [--port 3290]`
 * (10 s by default: at ~15 000 answers a second a longer run spends the bench workspace's whole
 * monthly allowance, and the paused answers would then be counted as throughput.)
 *
 * 1. first-load JavaScript of the calculator page, gzipped (every script Chromium fetches
 *    until the form is interactive, each body gzipped at level 9), and what the chart adds
 *    after the first answer;
 * 2. time until the form is interactive (the page's `partwise:interactive` mark, median of runs);
 * 3. the scoring route (served by the app server's fast path, lib/server) under autocannon
 *    next to a bare node:http server answering the same JSON, in the same run, each after
 *    the same warm-up (`--warm-up 5` seconds, discarded), and their ratio.
 * Builds into NEXT_DIST_DIR (default .next-bench) when stale; uses a fresh SQLite file.
 */
const DURATION = Number(arg('duration', '10'));
const CONNECTIONS = Number(arg('connections', '64'));
const PORT = Number(arg('port', '3290'));
const RUNS = Number(arg('runs', '7'));
const DIST = process.env.NEXT_DIST_DIR || '.next-bench';
const DIR = path.resolve('.tmp/bench-embed');
const APP = `http://127.0.0.1:${PORT}`;

async function measurePage(token: string) {
  const { launchBrowser } = await import('../tests/helpers/browser');
  const browser = await launchBrowser();
  const gz = (b: Buffer) => zlib.gzipSync(b, { level: 9 }).length;
  const firstLoad: { url: string; raw: number; gzip: number }[] = [];
  const afterAnswer: { url: string; raw: number; gzip: number }[] = [];
  const times: number[] = [];
  try {
    for (let i = 0; i < RUNS; i++) {
      const context = await browser.newContext({ viewport: { width: 1280, height: 900 } });
      const page = await context.newPage();
      const scripts = new Map<string, Promise<Buffer | null>>();
      page.on('response', (r) => {
        if (r.request().resourceType() === 'script') scripts.set(r.url(), r.body().catch(() => null));
      });
      await page.goto(`${APP}/embed/${token}`);
      await page.waitForFunction(() => performance.getEntriesByName('partwise:interactive').length > 0, null, { timeout: 20_000 });
      times.push(await page.evaluate(() => performance.getEntriesByName('partwise:interactive')[0].startTime));
      if (i === 0) {
        const loaded = new Set(scripts.keys());
        for (const [url, body] of scripts) {
          const b = await body;
          if (b) firstLoad.push({ url, raw: b.length, gzip: gz(b) });
        }
        await page.getByLabel('Average speed (km/h)').fill(String(BENCH_VALUES.avg_speed_kmh));
        await page.getByLabel('Weekly distance (km)').fill(String(BENCH_VALUES.weekly_distance_km));
        await page.getByLabel('Climbing per ride (m)').fill(String(BENCH_VALUES.climb_per_ride_m));
        await page.getByRole('button', { name: 'Show my groups' }).click();
        await page.waitForSelector('[data-chart-ready="true"] svg', { timeout: 20_000 });
        for (const [url, body] of scripts) {
          if (loaded.has(url)) continue;
          const b = await body;
          if (b) afterAnswer.push({ url, raw: b.length, gzip: gz(b) });
        }
      }
      await context.close();
    }
  } finally {
    await browser.close();
  }
  return { firstLoad, afterAnswer, times };
}

interface LoadFigures {
  rps: number;
  p50: number;
  p99: number;
  errors: number;
  non2xx: number;
  total: number;
}

const WARM_UP = Number(arg('warm-up', '5'));

/** Drive one URL: a warm-up under the same load (discarded: JIT, caches), then the measured run. */
async function load(url: string, body: string, headers: Record<string, string>): Promise<LoadFigures> {
  if (WARM_UP > 0) await autocannon({ url, method: 'POST', body, headers, connections: CONNECTIONS, duration: WARM_UP, pipelining: 1 });
  const result = await autocannon({ url, method: 'POST', body, headers, connections: CONNECTIONS, duration: DURATION, pipelining: 1 });
  return {
    rps: result.requests.average,
    p50: result.latency.p50,
    p99: result.latency.p99,
    errors: result.errors + result.timeouts,
    non2xx: result.non2xx,
    total: result.requests.total,
  };
}

function bareServer(answer: string): Promise<http.Server> {
  return new Promise((resolve) => {
    const server = http.createServer((req, res) => {
      let size = 0;
      req.on('data', (c: Buffer) => (size += c.length));
      req.on('end', () => {
        res.writeHead(200, { 'content-type': 'application/json', 'cache-control': 'no-store' });
        res.end(answer);
      });
    });
    server.listen(0, '127.0.0.1', () => resolve(server));
  });
}

const kb = (n: number) => `${(n / 1024).toFixed(1)} kB`;

async function main() {
  await ensureBuilt(DIST, 'bench');
  freshDir(DIR);
  const appEnv = benchAppEnv({ dist: DIST, dir: DIR, url: APP });
  const { token } = await publishBenchCalculator(appEnv, { title: 'Which ride group suits you?' });
  const server = await startBenchServer(PORT, appEnv, DIR);
  let bare: http.Server | undefined;
  try {
    // Warm the page and the route (first compile of each, version cache).
    await fetch(`${APP}/embed/${token}`).then((r) => r.text());

    const page = await measurePage(token);
    const scoreUrl = `${APP}/api/score/${token}`;
    const body = JSON.stringify({ values: BENCH_VALUES });
    const headers = { 'content-type': 'application/json' };
    const sample = await fetch(scoreUrl, { method: 'POST', headers, body });
    if (sample.status !== 200) throw new Error(`scoring answered ${sample.status}: ${await sample.text()}`);
    const answer = await sample.text();

    console.log(`[bench] scoring route: ${CONNECTIONS} connections, ${WARM_UP} s warm-up, then ${DURATION} s…`);
    const route = await load(scoreUrl, body, headers);
    bare = await bareServer(answer);
    const bareUrl = `http://127.0.0.1:${(bare.address() as { port: number }).port}/`;
    console.log(`[bench] bare node:http with the same JSON: ${CONNECTIONS} connections, ${WARM_UP} s warm-up, then ${DURATION} s…`);
    const baseline = await load(bareUrl, body, headers);

    const firstGzip = page.firstLoad.reduce((s, f) => s + f.gzip, 0);
    const firstRaw = page.firstLoad.reduce((s, f) => s + f.raw, 0);
    const chartGzip = page.afterAnswer.reduce((s, f) => s + f.gzip, 0);
    const sorted = [...page.times].sort((a, b) => a - b);
    const median = sorted[Math.floor(sorted.length / 2)];
    console.log('\n== calculator page ==');
    console.log(`first-load JS: ${page.firstLoad.length} scripts, ${kb(firstRaw)} raw, ${kb(firstGzip)} gzipped (target ≤ 250 kB)`);
    for (const f of page.firstLoad.sort((a, b) => b.gzip - a.gzip)) console.log(`  ${kb(f.gzip).padStart(9)}  ${f.url.replace(APP, '')}`);
    console.log(`chart runtime loaded with the first answer: ${page.afterAnswer.length} scripts, ${kb(chartGzip)} gzipped`);
    console.log(`time to interactive form: median ${median.toFixed(0)} ms, best ${sorted[0].toFixed(0)} ms, worst ${sorted[sorted.length - 1].toFixed(0)} ms over ${sorted.length} loads (target < 1000 ms)`);
    console.log('\n== scoring route vs bare node:http ==');
    const row = (name: string, f: LoadFigures) => console.log(`${name.padEnd(22)} ${f.rps.toFixed(0).padStart(7)} req/s   p50 ${String(f.p50).padStart(4)} ms   p99 ${String(f.p99).padStart(4)} ms   errors ${f.errors}   non-2xx ${f.non2xx}   total ${f.total}`);
    row('POST /api/score/TOKEN', route);
    row('bare node:http', baseline);
    console.log(`ratio (route / bare): ${(route.rps / baseline.rps).toFixed(2)}× (target ≥ 0.5×, p99 < 20 ms, 0 errors)`);
  } finally {
    bare?.close();
    stopGroup(server);
  }
}

runBench(main, 'bench');

/**
 * The nightly re-fit and publish, with nothing but fetch: the same calls as the curl
 * example in the README ("Automating with the API"). A user copies this into their own
 * pipeline; it imports nothing from the app.
 *
 *   PARTWISE_URL=https://partwise.example PARTWISE_API_KEY=pwk_… \
 *     npx tsx scripts/examples/nightly-refit.ts rides.csv
 *
 * Optional settings (environment):
 *   PARTWISE_CALCULATOR_ID  publish a new version of this calculator and serve it
 *                           (without it, a new calculator is published)
 *   PARTWISE_FEATURES       comma-separated columns to fit (default: every numeric column)
 *   PARTWISE_CLUSTER_NAMES  comma-separated names for the clusters, in the model's order
 *   PARTWISE_MAX_COMPONENTS the largest component count to try (default 5)
 *
 * The key needs the read, fit and publish scopes. Prints each step; exits with 1 and the
 * server's message when a step is refused.
 */
import fs from 'node:fs';
import path from 'node:path';

const base = (process.env.PARTWISE_URL ?? '').replace(/\/+$/, '');
const key = process.env.PARTWISE_API_KEY ?? '';
const csvPath = process.argv[2] ?? process.env.PARTWISE_CSV ?? '';

function fail(message: string): never {
  console.error(`nightly-refit: ${message}`);
  process.exit(1);
}

if (!base) fail('set PARTWISE_URL to the address of your Partwise, like https://partwise.example');
if (!key) fail('set PARTWISE_API_KEY to a key made under Studio → API keys (scopes read, fit, publish)');
if (!csvPath) fail('give the CSV file to upload: nightly-refit.ts rides.csv');

interface ApiError {
  error?: { code?: string; message?: string; issues?: { field: string; message: string }[] };
}

/** One call: JSON (or a CSV body) in, JSON out; any refusal ends the run with the server's words. */
async function api<T>(method: string, route: string, body?: unknown, contentType = 'application/json'): Promise<T> {
  const res = await fetch(`${base}${route}`, {
    method,
    headers: { authorization: `Bearer ${key}`, accept: 'application/json', ...(body !== undefined ? { 'content-type': contentType } : {}) },
    body: body === undefined ? undefined : contentType === 'application/json' ? JSON.stringify(body) : (body as string),
  });
  const text = await res.text();
  const json = text ? (JSON.parse(text) as T & ApiError) : ({} as T & ApiError);
  if (!res.ok) {
    const issues = json.error?.issues?.map((i) => `\n  ${i.field}: ${i.message}`).join('') ?? '';
    fail(`${method} ${route} answered ${res.status}: ${json.error?.message ?? text}${issues}`);
  }
  return json;
}

const step = (n: number, words: string) => console.log(`\n${n}. ${words}`);
const list = (v: string | undefined) => (v ?? '').split(',').map((s) => s.trim()).filter(Boolean);

async function main() {
  const csv = fs.readFileSync(csvPath, 'utf8');
  const name = `${path.basename(csvPath).replace(/\.[^.]+$/, '')} ${new Date().toISOString().slice(0, 10)}`;

  step(1, `Upload ${csvPath}`);
  const { dataset } = await api<{ dataset: { id: number; rowCount: number; columns: { name: string; kind: string }[] } }>('POST', `/api/v1/datasets?name=${encodeURIComponent(name)}`, csv, 'text/csv');
  console.log(`   dataset ${dataset.id}: ${dataset.rowCount} rows`);

  const features = list(process.env.PARTWISE_FEATURES).length ? list(process.env.PARTWISE_FEATURES) : dataset.columns.filter((c) => c.kind === 'numeric').map((c) => c.name);
  const maxComponents = Number(process.env.PARTWISE_MAX_COMPONENTS ?? 5);
  step(2, `Start a fit of ${features.join(', ')} with 1–${maxComponents} components`);
  let { fit } = await api<{ fit: { id: number; status: string; error: string | null; progress: { fraction?: number } | null } }>('POST', '/api/v1/fits', {
    datasetId: dataset.id,
    features,
    minComponents: 1,
    maxComponents,
    covariances: ['full', 'diagonal'],
    restarts: 3,
    seed: 1,
  });
  console.log(`   fit ${fit.id}: ${fit.status}`);

  step(3, 'Wait for it to finish');
  while (fit.status === 'queued' || fit.status === 'running') {
    ({ fit } = await api<{ fit: typeof fit }>('GET', `/api/v1/fits/${fit.id}?wait=30`));
    console.log(`   ${fit.status}${fit.progress?.fraction !== undefined ? ` (${Math.round(fit.progress.fraction * 100)} %)` : ''}`);
  }
  if (fit.status !== 'succeeded') fail(`the fit ${fit.status}: ${fit.error ?? 'no reason given'}`);

  step(4, 'Read the ranking (lowest BIC first)');
  const { ranking } = await api<{ ranking: { candidates: { index: number; rank: number | null; components: number; covariance: string; bic: number | null; aic: number | null }[] } }>('GET', `/api/v1/fits/${fit.id}/ranking`);
  for (const c of ranking.candidates.slice(0, 5)) console.log(`   #${c.index} rank ${c.rank ?? '—'}: ${c.components} × ${c.covariance}, BIC ${c.bic?.toFixed(1) ?? '—'}, AIC ${c.aic?.toFixed(1) ?? '—'}`);
  const best = ranking.candidates.find((c) => c.rank === 1);
  if (!best) fail('no candidate could be fitted');

  step(5, `Keep candidate #${best.index} (${best.components} × ${best.covariance}) as a model`);
  const { model } = await api<{ model: { id: number; clusters: { label: string; description: string; color: string }[] } }>('POST', '/api/v1/models', { fitId: fit.id, candidate: best.index, name: `Nightly ${name}` });
  console.log(`   model ${model.id}: ${model.clusters.length} clusters`);

  step(6, 'Name the clusters');
  const names = list(process.env.PARTWISE_CLUSTER_NAMES);
  const clusters = model.clusters.map((c, i) => ({ ...c, label: names[i] ?? c.label }));
  await api('PATCH', `/api/v1/models/${model.id}`, { clusters });
  console.log(`   ${clusters.map((c) => c.label).join(', ')}`);

  const calculatorId = process.env.PARTWISE_CALCULATOR_ID;
  let calculator: { id: number; token: string; activeVersionId: number | null };
  let versionId: number;
  if (calculatorId) {
    step(7, `Publish a new version of calculator ${calculatorId} (not served yet)`);
    const published = await api<{ calculator: typeof calculator; version: { id: number; number: number } }>('POST', `/api/v1/calculators/${calculatorId}/versions`, { mixtureModelId: model.id, activate: false });
    versionId = published.version.id;
    console.log(`   version ${published.version.number} (id ${versionId})`);

    step(8, `Serve version id ${versionId}`);
    ({ calculator } = await api<{ calculator: typeof calculator }>('PUT', `/api/v1/calculators/${calculatorId}/served-version`, { versionId }));
  } else {
    step(7, 'Publish the model as a new calculator');
    const published = await api<{ calculator: typeof calculator; version: { id: number; number: number } }>('POST', '/api/v1/calculators', { mixtureModelId: model.id, title: `Nightly ${name}` });
    calculator = published.calculator;
    versionId = published.version.id;
    console.log(`   calculator ${calculator.id}, version id ${versionId}`);
    step(8, 'It is served at once');
  }
  const check = await api<{ calculator: typeof calculator }>('GET', `/api/v1/calculators/${calculator.id}`);
  if (check.calculator.activeVersionId !== versionId) fail(`calculator ${calculator.id} serves version id ${check.calculator.activeVersionId}, not ${versionId}`);
  console.log(`   calculator ${calculator.id} serves version id ${versionId} at ${base}/embed/${check.calculator.token}`);

  step(9, "Read this month's usage");
  const { usage } = await api<{ usage: { period: string; answers: { used: number; allowance: number }; calculators: { calculatorId: number; title: string; answers: number }[] } }>('GET', '/api/v1/usage');
  console.log(`   ${usage.period}: ${usage.answers.used} of ${usage.answers.allowance} answers`);
  for (const c of usage.calculators) console.log(`   ${c.title}: ${c.answers}`);
  console.log(`\nDone: calculator ${calculator.id} serves version id ${versionId}.`);
}

main().catch((error) => fail(error instanceof Error ? error.message : String(error)));

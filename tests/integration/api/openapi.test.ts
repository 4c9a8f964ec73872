import fs from 'node:fs';
import path from 'node:path';
import { Validator } from '@seriousme/openapi-schema-validator';
import { describe, expect, it } from 'vitest';
import { GET as openApiRoute } from '@/app/api/openapi.json/route';
import { openApiDocument, SCOPE_EXTENSION } from '@/lib/api/openapi/registry';
import { componentFields, referenceOf } from '@/lib/api/openapi/reference';

const METHODS = ['GET', 'POST', 'PUT', 'PATCH', 'DELETE'] as const;
/** The public API: what the document must cover, route file for route file. */
const PUBLIC_ROOTS = ['app/api/v1', 'app/api/score'];

function routeFiles(dir: string): string[] {
  const out: string[] = [];
  for (const entry of fs.readdirSync(dir, { withFileTypes: true })) {
    const full = path.join(dir, entry.name);
    if (entry.isDirectory()) out.push(...routeFiles(full));
    else if (entry.name === 'route.ts') out.push(full.split(path.sep).join('/'));
  }
  return out.sort();
}

/** app/api/v1/fits/[id]/ranking/route.ts → /api/v1/fits/{id}/ranking */
function openApiPath(file: string): string {
  return file
    .replace(/^app/, '')
    .replace(/\/route\.ts$/, '')
    .replace(/\[(\w+)\]/g, '{$1}');
}

async function operationsOnDisk(): Promise<string[]> {
  const ops: string[] = [];
  for (const file of PUBLIC_ROOTS.flatMap((root) => routeFiles(root))) {
    const mod = await import(path.resolve(file));
    for (const method of METHODS) if (typeof mod[method] === 'function') ops.push(`${method.toLowerCase()} ${openApiPath(file)}`);
  }
  return ops.sort();
}

function operationsInDocument(): string[] {
  const doc = openApiDocument();
  return Object.entries(doc.paths ?? {})
    .flatMap(([p, item]) => Object.keys(item as object).filter((m) => ['get', 'post', 'put', 'patch', 'delete'].includes(m)).map((m) => `${m} ${p}`))
    .sort();
}

describe('the OpenAPI document', () => {
  it('is a valid OpenAPI 3.1 document', async () => {
    const result = await new Validator().validate(structuredClone(openApiDocument()) as unknown as Parameters<Validator["validate"]>[0]);
    expect(result.errors ?? null).toBeNull();
    expect(result.valid).toBe(true);
    expect(openApiDocument().openapi).toBe('3.1.0');
  });

  it('covers every exported method of every public route file, and names no route that does not exist', async () => {
    const disk = await operationsOnDisk();
    const documented = operationsInDocument();
    expect(disk.length).toBeGreaterThan(10);
    expect(disk.filter((op) => !documented.includes(op)), 'route files with no operation in lib/api/openapi/registry.ts').toEqual([]);
    expect(documented.filter((op) => !disk.includes(op)), 'operations in the document with no route file').toEqual([]);
  });

  it('asks a key with a scope for every /api/v1 operation, and none for public scoring', () => {
    const doc = openApiDocument();
    for (const [p, item] of Object.entries(doc.paths ?? {})) {
      for (const [method, op] of Object.entries(item as Record<string, { security?: unknown[]; [k: string]: unknown }>)) {
        if (p.startsWith('/api/v1/')) {
          expect(op.security, `${method} ${p}`).toEqual([{ apiKey: [] }]);
          expect(['read', 'fit', 'publish', 'score'], `${method} ${p}`).toContain(op[SCOPE_EXTENSION]);
          expect(Object.keys(op.responses as object), `${method} ${p}`).toEqual(expect.arrayContaining(['401', '403']));
        } else expect(op.security, `${method} ${p}`).toEqual([]);
      }
    }
    expect(doc.components?.securitySchemes?.apiKey).toMatchObject({ type: 'http', scheme: 'bearer' });
  });

  it("carries the routes' own zod constraints (defaults, bounds, enums, strictness)", () => {
    const doc = openApiDocument() as any;
    const fitBody = doc.paths['/api/v1/fits'].post.requestBody.content['application/json'].schema;
    expect(fitBody.required).toEqual(['datasetId', 'features']);
    expect(fitBody.properties.maxComponents).toMatchObject({ type: 'integer', minimum: 1, maximum: 12, default: 8 });
    expect(fitBody.properties.covariances.items.enum).toEqual(['full', 'diagonal', 'spherical', 'tied']);
    const served = doc.paths['/api/v1/calculators/{id}/served-version'].put.requestBody.content['application/json'].schema;
    expect(served).toMatchObject({ required: ['versionId'], additionalProperties: false });
    const patch = doc.paths['/api/v1/models/{id}'].patch.requestBody.content['application/json'].schema;
    expect(patch.properties.clusters.items.properties.label).toMatchObject({ type: 'string', minLength: 1, maxLength: 60 });
  });

  it('is served at /api/openapi.json', async () => {
    const res = await openApiRoute(new Request('http://localhost:3000/api/openapi.json'), { params: Promise.resolve({}) });
    expect(res.status).toBe(200);
    expect(await res.json()).toEqual(JSON.parse(JSON.stringify(openApiDocument())));
  });

  it('reads into the reference page: every operation under its tag, body fields with types and rules in words', () => {
    const doc = openApiDocument() as unknown as Record<string, unknown>;
    const tags = referenceOf(doc);
    expect(tags.map((t) => t.name)).toEqual(['Datasets', 'Fits', 'Models', 'Calculators', 'Usage', 'Scoring']);
    expect(tags.flatMap((t) => t.operations.map((o) => `${o.method.toLowerCase()} ${o.path}`)).sort()).toEqual(operationsInDocument());
    const start = tags.find((t) => t.name === 'Fits')!.operations.find((o) => o.method === 'POST')!;
    expect(start.scope).toBe('fit');
    const field = (name: string) => start.body!.fields.find((f) => f.name === name);
    expect(field('datasetId')).toMatchObject({ type: 'integer', required: true, constraints: ['above 0'] });
    expect(field('maxComponents')).toMatchObject({ type: 'integer', required: false, constraints: ['from 1 to 12', 'default 8'] });
    expect(field('covariances')!.constraints).toContain('each one of "full", "diagonal", "spherical", "tied"');
    const patch = tags.find((t) => t.name === 'Models')!.operations.find((o) => o.method === 'PATCH')!;
    expect(patch.body!.fields.find((f) => f.name === 'clusters[].label')).toMatchObject({ type: 'string', required: true, constraints: ['1–60 characters'] });
    const wait = tags.find((t) => t.name === 'Fits')!.operations.find((o) => o.path === '/api/v1/fits/{id}')!.parameters.find((p) => p.name === 'wait');
    expect(wait).toMatchObject({ in: 'query', required: false });
    expect(componentFields(doc, 'Ranking').map((f) => f.name)).toEqual(expect.arrayContaining(['candidates', 'candidates[].bic', 'candidates[].aic']));
  });

  it("names only documented operations in the README's curl example, and the example covers the job", () => {
    const readme = fs.readFileSync('README.md', 'utf8');
    const section = readme.slice(readme.indexOf('## Automating with the API'), readme.indexOf('\n## ', readme.indexOf('## Automating with the API') + 5));
    const calls = [...section.matchAll(/curl -sS (?:-X (GET|POST|PUT|PATCH|DELETE) )?"\$PARTWISE_URL(\/api\/v1\/[^"?]*)/g)].map((m) => {
      const templated = m[2].replace(/\/\d+(?=\/|$)/g, (seg, offset: number, whole: string) => {
        const before = whole.slice(0, offset);
        return /\/(datasets|fits|models|calculators)$/.test(before) ? '/{id}' : seg;
      });
      return `${(m[1] ?? 'GET').toLowerCase()} ${templated}`;
    });
    const documented = operationsInDocument();
    expect(calls.filter((c) => !documented.includes(c)), 'README curl calls with no such operation').toEqual([]);
    for (const step of ['post /api/v1/datasets', 'post /api/v1/fits', 'get /api/v1/fits/{id}', 'get /api/v1/fits/{id}/ranking', 'post /api/v1/models', 'patch /api/v1/models/{id}', 'post /api/v1/calculators/{id}/versions', 'put /api/v1/calculators/{id}/served-version', 'get /api/v1/usage']) {
      expect(calls, step).toContain(step);
    }
  });
});

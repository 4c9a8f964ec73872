/**
 * The API reference page's reading of the OpenAPI document: operations grouped by tag,
 * each with its parameters, body fields (flattened to dotted names, with types and
 * constraints in words) and responses. Pure: takes the generated document, so the page
 * shows exactly what /api/openapi.json says.
 */
import { formatCount } from '@/lib/format';

type Json = Record<string, unknown>;
interface Schema {
  type?: string | string[];
  $ref?: string;
  properties?: Record<string, Schema>;
  required?: string[];
  items?: Schema;
  enum?: unknown[];
  anyOf?: Schema[];
  oneOf?: Schema[];
  allOf?: Schema[];
  additionalProperties?: boolean | Schema;
  minimum?: number;
  maximum?: number;
  exclusiveMinimum?: number;
  exclusiveMaximum?: number;
  minLength?: number;
  maxLength?: number;
  minItems?: number;
  maxItems?: number;
  pattern?: string;
  default?: unknown;
  description?: string;
  format?: string;
  const?: unknown;
}

export interface FieldRow {
  name: string;
  type: string;
  required: boolean;
  constraints: string[];
  description?: string;
}

export interface OperationView {
  id: string;
  method: string;
  path: string;
  summary: string;
  description: string;
  scope: string | null;
  parameters: (FieldRow & { in: string })[];
  body: { mediaType: string; fields: FieldRow[]; strict: boolean } | null;
  responses: { status: string; description: string; schema: string | null }[];
}

export interface TagView {
  name: string;
  description: string;
  operations: OperationView[];
}

const num = (v: number) => (Number.isInteger(v) ? formatCount(v) : String(v));
const refName = (ref: string) => ref.split('/').pop() ?? ref;

function typeWords(s: Schema): string {
  if (s.$ref) return refName(s.$ref);
  const variants = s.anyOf ?? s.oneOf;
  if (variants) return variants.map(typeWords).join(' or ');
  const types = Array.isArray(s.type) ? s.type : s.type ? [s.type] : [];
  if (types.includes('array')) return `array of ${s.items ? typeWords(s.items) : 'anything'}`;
  if (s.enum) return s.enum.map((v) => JSON.stringify(v)).join(' | ');
  if (types.length === 0) return 'any';
  return types.join(' or ');
}

function constraintWords(s: Schema): string[] {
  const out: string[] = [];
  const lo = s.minimum ?? s.exclusiveMinimum;
  const hi = s.maximum ?? s.exclusiveMaximum;
  if (lo !== undefined && hi !== undefined) out.push(`${s.exclusiveMinimum !== undefined ? 'above' : 'from'} ${num(lo)} ${s.exclusiveMaximum !== undefined ? 'to below' : 'to'} ${num(hi)}`);
  else if (s.exclusiveMinimum !== undefined) out.push(`above ${num(s.exclusiveMinimum)}`);
  else if (s.minimum !== undefined) out.push(`at least ${num(s.minimum)}`);
  else if (hi !== undefined) out.push(`at most ${num(hi)}`);
  if (s.minLength !== undefined && s.maxLength !== undefined) out.push(`${num(s.minLength)}–${num(s.maxLength)} characters`);
  else if (s.maxLength !== undefined) out.push(`up to ${num(s.maxLength)} characters`);
  else if (s.minLength !== undefined && s.minLength > 0) out.push(`at least ${num(s.minLength)} character${s.minLength === 1 ? '' : 's'}`);
  if (s.minItems !== undefined && s.maxItems !== undefined) out.push(`${num(s.minItems)}–${num(s.maxItems)} items`);
  else if (s.minItems !== undefined) out.push(`at least ${num(s.minItems)} item${s.minItems === 1 ? '' : 's'}`);
  else if (s.maxItems !== undefined) out.push(`up to ${num(s.maxItems)} items`);
  if (s.items?.enum) out.push(`each one of ${s.items.enum.map((v) => JSON.stringify(v)).join(', ')}`);
  if (s.pattern) out.push(`matches ${s.pattern}`);
  if (s.format) out.push(s.format);
  if (s.default !== undefined) out.push(`default ${JSON.stringify(s.default)}`);
  return out;
}

/** An object schema's fields, nested objects and arrays of objects flattened to dotted names (`clusters[].label`). */
export function schemaFields(schema: Schema, prefix = '', depth = 0): FieldRow[] {
  const rows: FieldRow[] = [];
  const required = new Set(schema.required ?? []);
  for (const [key, field] of Object.entries(schema.properties ?? {})) {
    const name = prefix ? `${prefix}.${key}` : key;
    rows.push({ name, type: typeWords(field), required: required.has(key), constraints: constraintWords(field), description: field.description });
    if (depth < 3) {
      if (field.properties) rows.push(...schemaFields(field, name, depth + 1));
      else if (field.items?.properties) rows.push(...schemaFields(field.items, `${name}[]`, depth + 1));
    }
  }
  return rows;
}

const METHOD_ORDER = ['get', 'post', 'put', 'patch', 'delete'];

export function referenceOf(doc: Json): TagView[] {
  const tags = ((doc.tags as { name: string; description?: string }[]) ?? []).map((t): TagView => ({ name: t.name, description: t.description ?? '', operations: [] }));
  const byName = new Map(tags.map((t) => [t.name, t]));
  for (const [path, item] of Object.entries((doc.paths as Record<string, Record<string, Json>>) ?? {})) {
    for (const method of METHOD_ORDER) {
      const op = item[method];
      if (!op) continue;
      const tagName = ((op.tags as string[]) ?? ['Other'])[0];
      if (!byName.has(tagName)) {
        const t = { name: tagName, description: '', operations: [] };
        tags.push(t);
        byName.set(tagName, t);
      }
      const params = ((op.parameters as (Json & { schema: Schema })[]) ?? []).map((p) => ({
        name: String(p.name),
        in: String(p.in),
        type: typeWords(p.schema),
        required: p.required === true,
        constraints: constraintWords(p.schema),
        description: (p.description as string | undefined) ?? p.schema.description,
      }));
      const content = ((op.requestBody as Json | undefined)?.content as Record<string, { schema: Schema }> | undefined) ?? null;
      const mediaType = content ? Object.keys(content)[0] : null;
      const bodySchema = mediaType ? content![mediaType].schema : null;
      const responses = Object.entries((op.responses as Record<string, Json>) ?? {}).map(([status, r]) => {
        const schema = (r.content as Record<string, { schema: Schema }> | undefined)?.['application/json']?.schema;
        const inner = schema?.properties ? Object.entries(schema.properties).map(([k, v]) => `${k}: ${typeWords(v)}`).join(', ') : null;
        return { status, description: String(r.description ?? ''), schema: schema ? (schema.$ref ? refName(schema.$ref) : inner ? `{ ${inner} }` : typeWords(schema)) : null };
      });
      byName.get(tagName)!.operations.push({
        id: String(op.operationId ?? `${method}-${path}`),
        method: method.toUpperCase(),
        path,
        summary: String(op.summary ?? ''),
        description: String(op.description ?? ''),
        scope: (op['x-partwise-scope'] as string | undefined) ?? null,
        parameters: params,
        body: mediaType && bodySchema ? { mediaType, fields: bodySchema.properties ? schemaFields(bodySchema) : [], strict: bodySchema.additionalProperties === false } : null,
        responses,
      });
    }
  }
  return tags.filter((t) => t.operations.length > 0);
}

/** A component schema's fields, for the "what comes back" list. */
export function componentFields(doc: Json, name: string): FieldRow[] {
  const schema = ((doc.components as Json | undefined)?.schemas as Record<string, Schema> | undefined)?.[name];
  return schema ? schemaFields(schema) : [];
}

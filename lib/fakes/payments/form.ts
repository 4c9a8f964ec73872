/**
 * The payment SDK sends bodies and query strings form-encoded with bracketed keys:
 * `metadata[plan]=bench`, `line_items[0][price]=price_1`, `expand[0]=x`. This turns
 * them back into nested objects, with integer-keyed objects as arrays.
 */
export type FormValue = string | FormValue[] | { [key: string]: FormValue };
export type FormObject = { [key: string]: FormValue };

export function parseForm(text: string): FormObject {
  const root: FormObject = {};
  for (const [rawKey, value] of new URLSearchParams(text)) {
    const match = /^([^[\]]+)((?:\[[^[\]]*\])*)$/.exec(rawKey);
    if (!match) continue;
    const path = [match[1], ...[...match[2].matchAll(/\[([^[\]]*)\]/g)].map((m) => m[1])];
    let node: Record<string, FormValue> = root;
    path.forEach((segment, i) => {
      // `a[]=x` appends, as some encoders do.
      const key = segment === '' ? String(Object.keys(node).length) : segment;
      if (i === path.length - 1) {
        node[key] = value;
        return;
      }
      const next = node[key];
      if (typeof next !== 'object' || next === null) node[key] = {};
      node = node[key] as Record<string, FormValue>;
    });
  }
  return arrayify(root) as FormObject;
}

function arrayify(value: FormValue): FormValue {
  if (typeof value === 'string' || Array.isArray(value)) return value;
  const keys = Object.keys(value);
  const entries = keys.map((k) => [k, arrayify(value[k])] as const);
  if (keys.length > 0 && keys.every((k) => /^\d+$/.test(k))) {
    return entries.sort((a, b) => Number(a[0]) - Number(b[0])).map(([, v]) => v);
  }
  return Object.fromEntries(entries);
}

export function str(v: FormValue | undefined): string | undefined {
  return typeof v === 'string' ? v : undefined;
}

export function obj(v: FormValue | undefined): FormObject {
  return v && typeof v === 'object' && !Array.isArray(v) ? v : {};
}

export function list(v: FormValue | undefined): FormValue[] {
  if (Array.isArray(v)) return v;
  if (v === undefined) return [];
  return typeof v === 'object' ? Object.values(v) : [v];
}

/** A flat string map, as metadata is. */
export function stringMap(v: FormValue | undefined): Record<string, string> {
  return Object.fromEntries(Object.entries(obj(v)).filter((e): e is [string, string] => typeof e[1] === 'string'));
}

export function bool(v: FormValue | undefined): boolean | undefined {
  if (v === 'true') return true;
  if (v === 'false') return false;
  return undefined;
}

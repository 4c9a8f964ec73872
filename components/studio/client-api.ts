/** Browser-side calls to the studio routes; errors carry the server's message and field issues. */
export class ApiError extends Error {
  constructor(
    message: string,
    readonly status: number,
    readonly issues: { field: string; message: string }[] = [],
  ) {
    super(message);
  }
}

export async function api<T>(url: string, init: RequestInit & { json?: unknown } = {}): Promise<T> {
  const { json, ...rest } = init;
  const res = await fetch(url, {
    ...rest,
    headers: { ...(json !== undefined ? { 'content-type': 'application/json' } : {}), ...(rest.headers ?? {}) },
    body: json !== undefined ? JSON.stringify(json) : rest.body,
  });
  if (res.status === 204) return undefined as T;
  const body = await res.json().catch(() => null);
  if (!res.ok) throw new ApiError(body?.error?.message ?? `The request failed (${res.status}).`, res.status, body?.error?.issues ?? []);
  return body as T;
}

export const fetcher = <T,>(url: string) => api<T>(url);

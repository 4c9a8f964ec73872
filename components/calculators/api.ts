'use client';

/** JSON calls from studio calculator components; errors come back as our AppError shape. */
export interface ApiFailure {
  message: string;
  issues: { field: string; message: string; suggestion?: string }[];
}

export async function callApi<T>(url: string, method: string, body?: unknown): Promise<{ ok: true; data: T } | { ok: false; error: ApiFailure }> {
  try {
    const res = await fetch(url, { method, headers: body === undefined ? undefined : { 'content-type': 'application/json' }, body: body === undefined ? undefined : JSON.stringify(body) });
    const data = await res.json().catch(() => null);
    if (res.ok) return { ok: true, data: data as T };
    return { ok: false, error: { message: data?.error?.message ?? `The request failed (${res.status}).`, issues: data?.error?.issues ?? [] } };
  } catch {
    return { ok: false, error: { message: 'Could not reach Partwise. Check the connection and try again.', issues: [] } };
  }
}

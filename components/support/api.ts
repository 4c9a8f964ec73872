/** Browser calls to the support routes; errors carry the server's message and field issues. */
export class SupportApiError extends Error {
  constructor(
    message: string,
    readonly status: number,
    readonly issues: { field: string; message: string }[] = [],
  ) {
    super(message);
  }
}

async function read<T>(res: Response): Promise<T> {
  const body = await res.json().catch(() => null);
  if (!res.ok) {
    if (res.status === 401) throw new SupportApiError('Your session has ended; sign in again.', 401);
    throw new SupportApiError(body?.error?.message ?? `The request failed (${res.status}).`, res.status, body?.error?.issues ?? []);
  }
  return body as T;
}

export async function getJson<T>(url: string): Promise<T> {
  return read<T>(await fetch(url, { headers: { accept: 'application/json' }, cache: 'no-store' }));
}

export async function postJson<T>(url: string, json: unknown, method = 'POST'): Promise<T> {
  return read<T>(await fetch(url, { method, headers: { 'content-type': 'application/json', accept: 'application/json' }, body: JSON.stringify(json ?? {}) }));
}

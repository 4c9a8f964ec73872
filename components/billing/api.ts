/** Browser-side calls to the billing routes; errors carry the server's message. */
export class BillingRequestError extends Error {}

export async function billingRequest<T>(path: string, method: 'GET' | 'POST', body?: unknown): Promise<T> {
  let res: Response;
  try {
    res = await fetch(path, {
      method,
      headers: body === undefined ? undefined : { 'content-type': 'application/json' },
      body: body === undefined ? undefined : JSON.stringify(body),
      cache: 'no-store',
    });
  } catch {
    throw new BillingRequestError('Partwise could not be reached. Check the connection and try again.');
  }
  const data = (await res.json().catch(() => null)) as ({ error?: { message?: string } } & T) | null;
  if (!res.ok) throw new BillingRequestError(data?.error?.message ?? `The request failed (${res.status}).`);
  return data as T;
}

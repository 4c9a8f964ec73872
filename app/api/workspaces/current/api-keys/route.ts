import { apiKeyCreateSchema, createApiKey, listApiKeys } from '@/lib/auth/api-keys';
import { requireWorkspace } from '@/lib/auth/guard';
import { readJson, route } from '@/lib/http/handler';

/** The workspace's API keys (owners only): names, prefixes, scopes, dates; never a secret or hash. */
export const GET = route(async (request) => {
  const actor = await requireWorkspace(request, 'owner');
  return Response.json({ keys: await listApiKeys(actor) }, { headers: { 'cache-control': 'no-store' } });
});

/** Make a key (owners only). The answer holds the whole key: the only time it is shown. */
export const POST = route(async (request) => {
  const actor = await requireWorkspace(request, 'owner');
  const input = await readJson(request, apiKeyCreateSchema);
  const { key, secret } = await createApiKey(actor, input, request);
  return Response.json({ key, secret }, { status: 201, headers: { 'cache-control': 'no-store' } });
});

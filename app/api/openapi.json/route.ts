import { openApiDocument } from '@/lib/api/openapi/registry';
import { route } from '@/lib/http/handler';

export const dynamic = 'force-dynamic';

/** The OpenAPI 3.1 document of /api/v1 and the public scoring route (public; generated from the routes' zod schemas). */
export const GET = route(async () => Response.json(openApiDocument(), { headers: { 'cache-control': 'public, max-age=300' } }));

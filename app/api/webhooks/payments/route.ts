import { processWebhook } from '@/lib/billing/webhooks';
import { AppError } from '@/lib/errors';
import { route } from '@/lib/http/handler';
import { readTextCapped } from '@/lib/http/body';

const MAX_EVENT_BYTES = 512 * 1024;

/**
 * Payment-service events. The signature covers the exact bytes sent, so the body is
 * read raw (never parsed and re-serialised) before verification.
 */
export const POST = route(async (request) => {
  if (Number(request.headers.get('content-length') ?? 0) > MAX_EVENT_BYTES) throw new AppError('payload_too_large', 'The event is too large.');
  // Read with the cap while it streams: a chunked body has no Content-Length to refuse it by.
  const raw = await readTextCapped(request.body, MAX_EVENT_BYTES, () => new AppError('payload_too_large', 'The event is too large.'));
  const result = await processWebhook(raw, request.headers.get('stripe-signature'), request);
  return Response.json(result);
}, { origin: 'any' });

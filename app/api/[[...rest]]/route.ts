import { AppError } from '@/lib/errors';
import { route } from '@/lib/http/handler';

/**
 * Every /api address no route file claims: the app's JSON 404 for every method, so a
 * client (or a typo in one) gets the same error shape as from a real route instead of
 * the HTML page-not-found. 'any' origin: a 404 changes nothing, whoever asks.
 */
const notFound = route(() => {
  throw new AppError('not_found', 'There is no API at this address. Check the path against the API documentation.');
}, { origin: 'any' });

export const GET = notFound;
export const HEAD = notFound;
export const POST = notFound;
export const PUT = notFound;
export const PATCH = notFound;
export const DELETE = notFound;
export const OPTIONS = notFound;

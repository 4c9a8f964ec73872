import { AppError } from '@/lib/errors';
import { route } from '@/lib/http/handler';

/**
 * Every /api address no route file claims: the app's JSON 404 for every method, so a
 * client (or a typo in one) gets the same error shape as from a real route instead of
 * the HTML page-not-found. 'any' origin: a 404 changes nothing, whoever asks.
 */
function noSuchApi(): never {
  throw new AppError('not_found', 'There is no API at this address; check the path and the method.');
}

export const GET = route(noSuchApi, { origin: 'any' });
export const HEAD = route(noSuchApi, { origin: 'any' });
export const POST = route(noSuchApi, { origin: 'any' });
export const PUT = route(noSuchApi, { origin: 'any' });
export const PATCH = route(noSuchApi, { origin: 'any' });
export const DELETE = route(noSuchApi, { origin: 'any' });
export const OPTIONS = route(noSuchApi, { origin: 'any' });

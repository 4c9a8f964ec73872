import { AppError } from '@/lib/errors';
import { clientAddress } from '@/lib/audit';
import { consumeLimit, type LimitOptions } from '@/lib/rate-limit';

/** Limits on the account routes that send mail or create records. */
export const ACCOUNT_LIMITS = {
  signUpPerAddress: { limit: 10, windowMs: 60 * 60_000 },
  mailPerAddress: { limit: 10, windowMs: 15 * 60_000 },
  /** Per recipient: over it, the mail is silently not sent again (no account oracle). */
  mailPerRecipient: { limit: 3, windowMs: 15 * 60_000 },
  invitesPerWorkspace: { limit: 30, windowMs: 60 * 60_000 },
} satisfies Record<string, LimitOptions>;

/** Count one request or throw 429 with Retry-After. */
export async function limitOrThrow(key: string, opts: LimitOptions, what: string): Promise<void> {
  const r = await consumeLimit(key, opts);
  if (!r.ok) {
    const minutes = Math.ceil(r.retryAfterSeconds / 60);
    throw new AppError('rate_limited', `Too many ${what} from here. Try again in ${minutes} minute${minutes === 1 ? '' : 's'}.`, { headers: { 'Retry-After': String(r.retryAfterSeconds) } });
  }
}

export function addressKey(request: Request | undefined): string {
  return clientAddress(request) ?? 'unknown';
}

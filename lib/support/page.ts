import 'server-only';
import { pageStaff } from '@/lib/auth/page';
import type { Actor } from '@/lib/auth/guard';
import { AppError } from '@/lib/errors';

/**
 * For support pages: the staff actor, or null when a signed-in non-staff user opens
 * one (the page then says so instead of failing). Visitors go to sign-in.
 */
export async function pageSupportActor(returnTo = '/support'): Promise<Actor | null> {
  try {
    return await pageStaff(returnTo);
  } catch (e) {
    if (e instanceof AppError && e.code === 'forbidden') return null;
    throw e;
  }
}

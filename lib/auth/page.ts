import 'server-only';
import { cookies, headers } from 'next/headers';
import { redirect } from 'next/navigation';
import { AppError } from '@/lib/errors';
import type { WorkspaceRole } from '@/models';
import { readActor, requireStaff, requireWorkspace, type Actor, type WorkspaceActor } from './guard';

/** Signed-in pages: the same checks as route handlers, from the page's request headers. */
async function pageRequest(): Promise<Request> {
  const h = await headers();
  const c = await cookies();
  return new Request('http://page.local/', {
    headers: { cookie: c.getAll().map((x) => `${x.name}=${encodeURIComponent(x.value)}`).join('; '), 'user-agent': h.get('user-agent') ?? '' },
  });
}

export async function pageActor(): Promise<Actor | null> {
  return readActor(await pageRequest());
}

/**
 * For a signed-in page: redirects visitors to sign-in; a member on an owners' page
 * goes back to the studio with a notice (the server refused, the page explains).
 */
export async function pageWorkspace(minRole: WorkspaceRole = 'member', returnTo = '/studio'): Promise<WorkspaceActor> {
  try {
    return await requireWorkspace(await pageRequest(), minRole);
  } catch (e) {
    if (e instanceof AppError && e.code === 'unauthenticated') redirect(`/signin?callbackUrl=${encodeURIComponent(returnTo)}`);
    if (e instanceof AppError && e.code === 'forbidden' && minRole === 'owner') redirect('/studio?notice=owners-only');
    throw e;
  }
}

/** The current workspace of a signed-in page, or null when the person has none (staff, removed). */
export async function pageCurrentWorkspace(returnTo = '/studio'): Promise<WorkspaceActor | null> {
  try {
    return await requireWorkspace(await pageRequest(), 'member');
  } catch (e) {
    if (e instanceof AppError && e.code === 'unauthenticated') redirect(`/signin?callbackUrl=${encodeURIComponent(returnTo)}`);
    if (e instanceof AppError && e.code === 'forbidden') return null;
    throw e;
  }
}

export async function pageStaff(returnTo = '/support'): Promise<Actor> {
  try {
    return await requireStaff(await pageRequest());
  } catch (e) {
    if (e instanceof AppError && e.code === 'unauthenticated') redirect(`/signin?callbackUrl=${encodeURIComponent(returnTo)}`);
    throw e;
  }
}

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

/** For a signed-in page: redirects visitors to sign-in, refuses wrong roles. */
export async function pageWorkspace(minRole: WorkspaceRole = 'member', returnTo = '/studio'): Promise<WorkspaceActor> {
  try {
    return await requireWorkspace(await pageRequest(), minRole);
  } catch (e) {
    if (e instanceof AppError && e.code === 'unauthenticated') redirect(`/signin?callbackUrl=${encodeURIComponent(returnTo)}`);
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

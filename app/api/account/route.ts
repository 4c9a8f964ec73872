import { route, readJson } from '@/lib/http/handler';
import { requireUser } from '@/lib/auth/guard';
import { listMyWorkspaces } from '@/lib/accounts/workspaces';
import { deleteAccount, updateProfile } from '@/lib/accounts/account';
import { deleteAccountSchema, updateProfileSchema } from '@/lib/accounts/account-schemas';
import { sessionCookieName, useSecureCookies, WORKSPACE_COOKIE } from '@/lib/auth/cookies';

/** The signed-in person and the workspaces they may switch between. */
export const GET = route(async (request) => {
  const actor = await requireUser(request);
  const workspaces = await listMyWorkspaces(actor.user.id);
  return Response.json({ user: { id: actor.user.id, email: actor.user.email, name: actor.user.name, isStaff: actor.isStaff }, workspaces });
});

/** Change the name shown to the team and in mails. */
export const PATCH = route(async (request) => {
  const actor = await requireUser(request);
  const input = await readJson(request, updateProfileSchema);
  const user = await updateProfile(actor.user, input, request);
  return Response.json({ user: { id: user.id, email: user.email, name: user.name } });
});

/** Delete the account (typed e-mail and password confirm it); this browser's cookies go with it. */
export const DELETE = route(async (request) => {
  const actor = await requireUser(request);
  const input = await readJson(request, deleteAccountSchema);
  const plan = await deleteAccount(actor.user, input, request);
  const secure = useSecureCookies() ? '; Secure' : '';
  const headers = new Headers();
  for (const name of [sessionCookieName(), WORKSPACE_COOKIE]) headers.append('set-cookie', `${name}=; Path=/; HttpOnly; SameSite=Lax; Max-Age=0${secure}`);
  return Response.json({ deleted: true, deletedWorkspaces: plan.deletedWorkspaces.map((w) => w.name) }, { headers });
});

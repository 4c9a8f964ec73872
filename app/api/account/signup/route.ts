import { readJson, route } from '@/lib/http/handler';
import { signUpSchema } from '@/lib/accounts/schemas';
import { signUp } from '@/lib/accounts/signup';
import { workspaceCookieHeader } from '@/lib/auth/cookies';

/** Public: create an account and its first workspace; a confirmation mail follows. */
export const POST = route(async (request) => {
  const input = await readJson(request, signUpSchema);
  const { user, workspace } = await signUp(input, request);
  return Response.json(
    { user: { id: user.id, email: user.email, name: user.name }, workspace: { id: workspace.id, name: workspace.name }, verificationSent: true },
    { status: 201, headers: { 'set-cookie': workspaceCookieHeader(workspace.id) } },
  );
});

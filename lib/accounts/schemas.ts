import { z } from 'zod';
import { storedText } from '@/lib/http/text';

/**
 * Input shapes of the account forms. Shared by the server (route handlers validate
 * with them and answer 422 with field issues) and the client forms (same rules, so
 * most mistakes show before a round trip). No server imports here.
 */
// Account pages run under a CSP without 'unsafe-eval'; zod's JIT would probe `new Function`
// there (a reported violation even though it is caught), so validate without it.
z.config({ jitless: true });

export const PASSWORD_MIN = 10;
/** What the password fields say up front; the server also refuses easily guessed ones (password-strength.ts). */
export const PASSWORD_HINT = `At least ${PASSWORD_MIN} characters and hard to guess: not a common password, your name or your e-mail. A few unrelated words work well.`;

export const email = storedText('The e-mail address').trim().toLowerCase().min(1, 'Enter your e-mail address.').max(320, 'That address is too long.').email('Enter a valid e-mail address, like name@example.org.');
export const password = z
  .string()
  .min(PASSWORD_MIN, `Use at least ${PASSWORD_MIN} characters.`)
  .max(200, 'Use at most 200 characters.')
  .refine((p) => p.length < PASSWORD_MIN || p.trim().length >= PASSWORD_MIN, 'Spaces alone do not count; use letters, digits or symbols too.');
export const personName = storedText('The name').trim().min(1, 'Tell us what to call you.').max(120, 'Use at most 120 characters.');
export const workspaceName = storedText('The workspace name').trim().min(2, 'Give the workspace a name of at least 2 characters.').max(120, 'Use at most 120 characters.');
export const token = storedText('The link').trim().min(16, 'This link is incomplete; open it again from the e-mail.').max(200, 'This link is not valid.');
export const roleSchema = z.enum(['owner', 'member'], { message: 'Choose owner or member.' });

/** A paid plan picked on the plans page before signing up; it is offered on the billing page after sign-in. */
export const wantedPlan = z.enum(['bench', 'lab'], { message: 'Choose Bench or Lab, or leave the plan out for the free Sketch plan.' });
export const signUpSchema = z.object({ name: personName, email, password, workspaceName, plan: wantedPlan.optional() });
export type SignUpInput = z.infer<typeof signUpSchema>;

export const signInSchema = z.object({ email, password: z.string().min(1, 'Enter your password.').max(200) });
export type SignInInput = z.infer<typeof signInSchema>;

export const emailOnlySchema = z.object({ email });
export const verifySchema = z.object({ token });
export const resetPasswordSchema = z.object({ token, password });

export const inviteSchema = z.object({ email, role: roleSchema.default('member') });
export type InviteInput = z.input<typeof inviteSchema>;

/** Accepting an invitation: a new person also chooses a name and password. */
export const acceptInvitationSchema = z.object({ token, name: personName.optional(), password: password.optional() });

export const changeRoleSchema = z.object({ role: roleSchema });
// A JSON number: z.coerce would also read "0x6" or "1e0" as an id.
export const switchWorkspaceSchema = z.object({ workspaceId: z.number({ message: 'Choose a workspace.' }).int('Choose a workspace.').positive('Choose a workspace.') });
export const createWorkspaceSchema = z.object({ name: workspaceName });

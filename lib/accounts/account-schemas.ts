import { z } from 'zod';
import { password, personName } from './schemas';

/**
 * Input shapes of the account page (name, password, deletion), shared by the route
 * handlers and the client forms. No server imports here.
 */
export const updateProfileSchema = z.object({ name: personName }).strict();
export type UpdateProfileInput = z.infer<typeof updateProfileSchema>;

export const changePasswordSchema = z
  .object({
    currentPassword: z.string().min(1, 'Enter your current password.').max(200, 'That is longer than any password here.'),
    // The new password follows the sign-up rules (lib/accounts/schemas `password`).
    newPassword: password,
  })
  .strict()
  .refine((v) => v.currentPassword !== v.newPassword, { message: 'Choose a password different from the current one.', path: ['newPassword'] });
export type ChangePasswordInput = z.infer<typeof changePasswordSchema>;

export const deleteAccountSchema = z
  .object({
    /** Typed by hand: the account's e-mail address. */
    confirmEmail: z.string().trim().toLowerCase().min(1, 'Type your e-mail address to confirm.').max(320, 'That address is too long.'),
    password: z.string().min(1, 'Enter your password.').max(200, 'That is longer than any password here.'),
  })
  .strict();
export type DeleteAccountInput = z.infer<typeof deleteAccountSchema>;

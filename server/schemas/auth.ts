/** Signing in: who is asking, and the bodies of the sign-in and password-reset routes (shared with the client). */
import { z } from 'zod';
import { emailSchema, newPasswordSchema, PASSWORD_MAX, type PublicUser } from './people.js';

/** Who is asking: the person, and whether by session cookie or API token. */
export interface AuthContext {
  user: PublicUser;
  via: 'cookie' | 'token';
  sessionId?: string;
  tokenId?: number;
}

export const signInSchema = z.object({
  email: emailSchema,
  password: z.string({ error: 'Enter your password.' }).min(1, 'Enter your password.').max(PASSWORD_MAX, `A password has at most ${PASSWORD_MAX} characters.`),
});
export type SignInBody = z.infer<typeof signInSchema>;

export const requestResetSchema = z.object({ email: emailSchema });
/** Whether a password change also revokes the person's API tokens (asked every time; default: revoke). */
export const revokeTokensSchema = z.boolean().default(true);
export const completeResetSchema = z.object({ token: z.string().min(10).max(200), password: newPasswordSchema, revokeTokens: revokeTokensSchema });
export const changePasswordSchema = z.object({
  currentPassword: z.string({ error: 'Enter your current password.' }).min(1, 'Enter your current password.').max(PASSWORD_MAX, `A password has at most ${PASSWORD_MAX} characters.`),
  newPassword: newPasswordSchema,
  revokeTokens: revokeTokensSchema,
});
export type ChangePasswordBody = z.input<typeof changePasswordSchema>;

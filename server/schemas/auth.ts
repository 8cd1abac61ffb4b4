/** Accounts: roles and the bodies of the account routes (shared by the server and the client). */
import { z } from 'zod';

export const ROLES = ['admin', 'steward', 'economist', 'editor', 'viewer'] as const;
export type Role = (typeof ROLES)[number];
export const roleSchema = z.enum(ROLES);

export const ROLE_LABELS: Record<Role, string> = {
  admin: 'Administrator',
  steward: 'Data steward',
  economist: 'Economist',
  editor: 'Editor',
  viewer: 'Reader',
};

export interface PublicUser {
  id: number;
  email: string;
  name: string;
  roles: Role[];
}

export interface AuthContext {
  user: PublicUser;
  via: 'cookie' | 'token';
  sessionId?: string;
  tokenId?: number;
}

export const emailSchema = z
  .string({ error: 'Enter an e-mail address.' })
  .trim()
  .min(3, 'Enter an e-mail address.')
  .max(254, 'An e-mail address has at most 254 characters.')
  .email('Enter an e-mail address like name@example.org.')
  .transform((s) => s.toLowerCase());

export const PASSWORD_MIN = 10;
export const PASSWORD_MAX = 256;
export const newPasswordSchema = z
  .string({ error: 'Choose a password.' })
  .min(PASSWORD_MIN, `Use at least ${PASSWORD_MIN} characters.`)
  .max(PASSWORD_MAX, `Use at most ${PASSWORD_MAX} characters.`);

export const signInSchema = z.object({
  email: emailSchema,
  password: z.string({ error: 'Enter your password.' }).min(1, 'Enter your password.').max(PASSWORD_MAX, `A password has at most ${PASSWORD_MAX} characters.`),
});
export type SignInBody = z.infer<typeof signInSchema>;

export const nameSchema = z.string({ error: 'Enter a name.' }).trim().min(1, 'Enter a name.').max(200, 'Use at most 200 characters.');

export const inviteSchema = z.object({
  email: emailSchema,
  roles: z.array(roleSchema).min(1, 'Choose at least one role.'),
});
export type InviteBody = z.infer<typeof inviteSchema>;

export const acceptInvitationSchema = z.object({
  token: z.string().min(10).max(200),
  name: nameSchema,
  password: newPasswordSchema,
});
export type AcceptInvitationBody = z.infer<typeof acceptInvitationSchema>;

export const requestResetSchema = z.object({ email: emailSchema });
export const completeResetSchema = z.object({ token: z.string().min(10).max(200), password: newPasswordSchema });

export const updateUserSchema = z
  .object({
    roles: z.array(roleSchema).min(1, 'A person needs at least one role.').optional(),
    status: z.enum(['active', 'deactivated']).optional(),
    name: nameSchema.optional(),
  })
  .refine((v) => v.roles || v.status || v.name, 'Send roles, status or name.');

export const createTokenSchema = z.object({
  name: z.string({ error: 'Name the token.' }).trim().min(1, 'Name the token.').max(100, 'Use at most 100 characters.'),
});

export const updateSettingsSchema = z.object({
  publicExhibitLinks: z.boolean(),
});

/** A message caught by the local fake mail server (the Mailbox page). */
export interface MailboxMessage {
  id: number;
  receivedAt: string;
  from: string;
  to: string[];
  subject: string;
  text: string;
  html: string | null;
}

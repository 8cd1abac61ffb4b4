/**
 * People: roles, the person as the API shows them, and the bodies of the People routes
 * (invitations, roles, tokens, workspace settings), shared by the server and the client.
 */
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

export const updateSettingsSchema = z
  .object({
    publicExhibitLinks: z.boolean().optional(),
    /** The institution's name, printed on exhibits' figures and publication packs. */
    institutionName: z.string().trim().max(120, 'The institution’s name has at most 120 characters.').optional(),
    /** The wording of exhibits' source line; {sources} stands for the exhibit's sources. */
    sourceLineWording: z
      .string()
      .trim()
      .min(1, 'Give the wording of the source line.')
      .max(200, 'The wording has at most 200 characters.')
      .refine((v) => v.includes('{sources}'), 'Put {sources} where the exhibit’s sources go, e.g. “Sources: {sources}; staff calculations.”')
      .optional(),
  })
  .refine((v) => Object.keys(v).length > 0, 'Send at least one setting.');
export type UpdateSettingsBody = z.infer<typeof updateSettingsSchema>;

/** A person as the People page lists them. */
export interface Person {
  id: number;
  email: string;
  name: string;
  status: 'active' | 'deactivated';
  roles: Role[];
  lastSignInAt: string | null;
  createdAt: string;
}

/** A pending invitation. */
export interface Invitation {
  id: number;
  email: string;
  roles: Role[];
  invitedBy: string | null;
  createdAt: string;
  expiresAt: string;
  expired: boolean;
  sendCount: number;
}

/** An API token as listed (the token itself is shown once, when it is made). */
export interface ApiToken {
  id: number;
  name: string;
  prefix: string;
  createdAt: string;
  lastUsedAt: string | null;
  revokedAt: string | null;
}

/** One line of the audit log. */
export interface AuditRow {
  id: number;
  at: string;
  action: string;
  actor: { id: number; email: string; name: string } | null;
  targetType: string | null;
  targetId: string | null;
  details: unknown;
  ip: string | null;
}

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

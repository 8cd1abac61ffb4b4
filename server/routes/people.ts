import type { AppDeps } from '../deps.js';
import { ACCESS } from '../schemas/access.js';
import { idParam, type RouteSpec } from '../lib/http.js';
import { createTokenSchema, inviteSchema, updateSettingsSchema, updateUserSchema } from '../schemas/people.js';
import { createToken, listTokens, revokeToken } from '../services/people/tokens.js';
import { invite, listInvitations, resendInvitation, revokeInvitation } from '../services/people/invitations.js';
import { assertNotSelfDeactivation, listUsers, updateUser } from '../services/people/users.js';
import { listAudit } from '../services/audit.js';
import { getSettings, updateSettings } from '../services/settings.js';
import { z } from 'zod';
import { HttpError } from '../lib/errors.js';

export function peopleRoutes(deps: AppDeps): RouteSpec[] {
  const { db } = deps;
  return [
    { method: 'get', path: '/users', access: ACCESS.people, summary: 'Everyone in the workspace', tags: ['people'], handler: async () => ({ items: await listUsers(db) }) },
    {
      method: 'patch',
      path: '/users/:id',
      access: ACCESS.people,
      summary: 'Change a person’s roles, name or status (deactivation ends their sessions and tokens)',
      tags: ['people'],
      body: updateUserSchema,
      handler: async ({ params, body, auth, req }) => {
        const id = idParam(params.id, 'The person');
        assertNotSelfDeactivation(auth!.user, id, body.status);
        return { user: await updateUser(deps, auth!.user, id, body, req.ip) };
      },
    },
    { method: 'get', path: '/invitations', access: ACCESS.people, summary: 'Pending invitations', tags: ['people'], handler: async () => ({ items: await listInvitations(db) }) },
    {
      method: 'post',
      path: '/invitations',
      access: ACCESS.people,
      summary: 'Invite someone by e-mail with roles',
      tags: ['people'],
      body: inviteSchema,
      status: 201,
      handler: ({ body, auth, req }) => invite(deps, auth!.user, body, req.ip),
    },
    {
      method: 'post',
      path: '/invitations/:id/resend',
      access: ACCESS.people,
      summary: 'Send an invitation again with a fresh link',
      tags: ['people'],
      handler: ({ params, auth, req }) => resendInvitation(deps, auth!.user, idParam(params.id, 'The invitation'), req.ip),
    },
    {
      method: 'delete',
      path: '/invitations/:id',
      access: ACCESS.people,
      summary: 'Withdraw a pending invitation',
      tags: ['people'],
      handler: ({ params, auth, req }) => revokeInvitation(db, auth!.user, idParam(params.id, 'The invitation'), req.ip),
    },
    {
      method: 'get',
      path: '/users/:id/tokens',
      access: ACCESS.people,
      summary: 'A person’s API tokens (to revoke them)',
      tags: ['people'],
      handler: async ({ params }) => ({ items: await listTokens(db, idParam(params.id, 'The person')) }),
    },
    {
      method: 'get',
      path: '/audit',
      access: ACCESS.people,
      summary: 'The audit log, newest first',
      tags: ['people'],
      query: z.object({ action: z.string().max(64).optional(), limit: z.coerce.number().int().min(1).max(1000).optional() }),
      handler: async ({ query }) => ({ items: await listAudit(db, query) }),
    },
    { method: 'get', path: '/settings', access: 'signedIn', summary: 'Workspace settings', tags: ['people'], handler: () => getSettings(db) },
    {
      method: 'put',
      path: '/settings',
      access: ACCESS.people,
      summary: 'Change workspace settings',
      tags: ['people'],
      body: updateSettingsSchema,
      handler: ({ body, auth, req }) => updateSettings(db, auth!.user.id, body, req.ip),
    },
    // Tokens: everyone manages their own.
    {
      method: 'post',
      path: '/tokens',
      access: 'signedIn',
      summary: 'Create a named API token; the token is shown once',
      tags: ['tokens'],
      body: createTokenSchema,
      status: 201,
      handler: async ({ body, auth, req }) => {
        const t = await createToken(db, auth!.user.id, body.name, req.ip);
        return { id: t.id, name: t.name, token: t.token, prefix: t.prefix };
      },
    },
    { method: 'get', path: '/tokens', access: 'signedIn', summary: 'My API tokens', tags: ['tokens'], handler: async ({ auth }) => ({ items: await listTokens(db, auth!.user.id) }) },
    {
      method: 'delete',
      path: '/tokens/:id',
      access: 'signedIn',
      summary: 'Revoke an API token (one’s own, or anyone’s as an administrator)',
      tags: ['tokens'],
      handler: ({ params, auth, req }) => revokeToken(db, auth!.user, idParam(params.id, 'The token'), req.ip),
    },
    {
      method: 'get',
      path: '/dev/mailbox',
      access: ACCESS.people,
      summary: 'Messages caught by the local fake mail server (development and tests only)',
      tags: ['people'],
      handler: () => {
        if (!deps.mailbox) throw new HttpError(404, 'mailbox_off', 'The Mailbox exists only with the local fake mail server (development and tests).');
        return { items: deps.mailbox.messages() };
      },
    },
  ];
}

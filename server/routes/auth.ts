import type { AppDeps } from '../deps.js';
import { clearSessionCookie, setSessionCookie } from '../auth/middleware.js';
import type { RouteSpec } from '../lib/http.js';
import { acceptInvitationSchema, completeResetSchema, requestResetSchema, signInSchema } from '../schemas/auth.js';
import * as accounts from '../services/accounts.js';
import { z } from 'zod';

export function authRoutes(deps: AppDeps): RouteSpec[] {
  const { lucia, db } = deps;
  return [
    {
      method: 'post',
      path: '/auth/sign-in',
      access: 'public',
      summary: 'Sign in with e-mail and password; sets the session cookie',
      tags: ['accounts'],
      body: signInSchema,
      handler: async ({ body, req, res }) => {
        const { user, session } = await accounts.signIn(deps, { ...body, ip: req.ip ?? '', userAgent: req.get('user-agent') });
        // A new session id at every sign-in (no fixation): end the one the browser came with.
        if (req.auth?.sessionId) await lucia.invalidateSession(req.auth.sessionId);
        setSessionCookie(res, lucia, session.id, req.secure);
        return { user };
      },
    },
    {
      method: 'post',
      path: '/auth/sign-out',
      access: 'signedIn',
      summary: 'End the current session',
      tags: ['accounts'],
      handler: async ({ auth, req, res }) => {
        if (auth?.sessionId) await lucia.invalidateSession(auth.sessionId);
        clearSessionCookie(res, lucia, req.secure);
        return { ok: true };
      },
    },
    {
      method: 'get',
      path: '/auth/me',
      access: 'signedIn',
      summary: 'The person signed in',
      tags: ['accounts'],
      handler: ({ auth }) => ({ user: auth!.user, via: auth!.via }),
    },
    {
      method: 'post',
      path: '/auth/password-reset',
      access: 'public',
      summary: 'Mail a password-reset link (the same answer whether or not the address has an account)',
      tags: ['accounts'],
      body: requestResetSchema,
      status: 202,
      handler: async ({ body, req }) => {
        await accounts.requestPasswordReset(deps, body.email, req.ip);
        return { ok: true, message: 'If this address has an account, a reset link is on its way.' };
      },
    },
    {
      method: 'post',
      path: '/auth/password-reset/complete',
      access: 'public',
      summary: 'Set a new password with a reset link; signs in',
      tags: ['accounts'],
      body: completeResetSchema,
      handler: async ({ body, req, res }) => {
        const { user, session } = await accounts.completePasswordReset(deps, body, req.ip ?? '', req.get('user-agent'));
        setSessionCookie(res, lucia, session.id, req.secure);
        return { user };
      },
    },
    {
      method: 'get',
      path: '/invitations/lookup/:token',
      access: 'public',
      summary: 'Check an invitation link before accepting it',
      tags: ['accounts'],
      handler: ({ params }) => accounts.lookupInvitation(db, z.string().max(200).parse(params.token)),
    },
    {
      method: 'post',
      path: '/invitations/accept',
      access: 'public',
      summary: 'Accept an invitation: set name and password; signs in',
      tags: ['accounts'],
      body: acceptInvitationSchema,
      status: 201,
      handler: async ({ body, req, res }) => {
        const { user, session } = await accounts.acceptInvitation(deps, body, req.ip ?? '', req.get('user-agent'));
        setSessionCookie(res, lucia, session.id, req.secure);
        return { user };
      },
    },
  ];
}

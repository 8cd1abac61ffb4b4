import type { Request, Response } from 'express';
import type { AppDeps } from '../deps.js';
import { clearSessionCookie, setSessionCookie } from '../auth/middleware.js';
import type { RouteSpec } from '../lib/http.js';
import { changePasswordSchema, completeResetSchema, requestResetSchema, signInSchema } from '../schemas/auth.js';
import { acceptInvitationSchema, type PublicUser } from '../schemas/people.js';
import { acceptResetRequest, changePassword, completePasswordReset, sendResetLink, signIn } from '../services/auth.js';
import { acceptInvitation, lookupInvitation } from '../services/people/invitations.js';
import { z } from 'zod';

export function authRoutes(deps: AppDeps): RouteSpec[] {
  const { lucia, db } = deps;
  /** Sets the cookie of a session just started and answers the person. */
  const signedIn = (req: Request, res: Response, started: { user: PublicUser; session: { id: string } }) => {
    setSessionCookie(res, lucia, started.session.id, req.secure);
    return { user: started.user };
  };
  return [
    {
      method: 'post',
      path: '/auth/sign-in',
      access: 'public',
      summary: 'Sign in with e-mail and password; sets the session cookie',
      tags: ['auth'],
      body: signInSchema,
      handler: async ({ body, req, res }) => {
        const started = await signIn(deps, { ...body, ip: req.ip ?? '', userAgent: req.get('user-agent') });
        // A new session id at every sign-in (no fixation): end the one the browser came with.
        if (req.auth?.sessionId) await lucia.invalidateSession(req.auth.sessionId);
        return signedIn(req, res, started);
      },
    },
    {
      method: 'post',
      path: '/auth/sign-out',
      access: 'signedIn',
      summary: 'End the current session',
      tags: ['auth'],
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
      tags: ['auth'],
      handler: ({ auth }) => ({ user: auth!.user, via: auth!.via }),
    },
    {
      method: 'post',
      path: '/auth/password-reset',
      access: 'public',
      summary: 'Mail a password-reset link (the same answer, at once, whether or not the address has an account)',
      tags: ['auth'],
      body: requestResetSchema,
      status: 202,
      handler: async ({ body, req }) => {
        const ip = req.ip ?? '';
        await acceptResetRequest(deps, body.email, ip);
        // Looking the address up and mailing happen after the answer: its content and its timing
        // are the same whether or not the address has an account.
        deps.background.run('password reset', () => sendResetLink(deps, body.email, ip));
        return { ok: true, message: 'If this address has an account, a reset link is on its way.' };
      },
    },
    {
      method: 'post',
      path: '/auth/password-reset/complete',
      access: 'public',
      summary: 'Set a new password with a reset link; ends every other session, revokes the API tokens unless revokeTokens is false; signs in',
      tags: ['auth'],
      body: completeResetSchema,
      handler: async ({ body, req, res }) => {
        const done = await completePasswordReset(deps, body, req.ip ?? '', req.get('user-agent'));
        return { ...signedIn(req, res, done), revokedTokens: done.revokedTokens };
      },
    },
    {
      method: 'post',
      path: '/auth/password',
      access: 'signedIn',
      summary: 'Change one’s password (the current one required); ends every other session, revokes the API tokens unless revokeTokens is false',
      tags: ['auth'],
      body: changePasswordSchema,
      handler: async ({ body, auth, req, res }) => {
        const done = await changePassword(deps, auth!.user, body, req.ip ?? '', req.get('user-agent'), auth!.via === 'cookie');
        if (done.session) setSessionCookie(res, lucia, done.session.id, req.secure);
        return { user: done.user, revokedTokens: done.revokedTokens };
      },
    },
    {
      method: 'get',
      path: '/invitations/lookup/:token',
      access: 'public',
      summary: 'Check an invitation link before accepting it',
      tags: ['auth'],
      handler: ({ params }) => lookupInvitation(db, z.string().max(200).parse(params.token)),
    },
    {
      method: 'post',
      path: '/invitations/accept',
      access: 'public',
      summary: 'Accept an invitation: set name and password; signs in',
      tags: ['auth'],
      body: acceptInvitationSchema,
      status: 201,
      handler: async ({ body, req, res }) => {
        return signedIn(req, res, await acceptInvitation(deps, body, req.ip ?? '', req.get('user-agent')));
      },
    },
  ];
}

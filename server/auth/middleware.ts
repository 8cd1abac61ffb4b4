/**
 * Who is asking: a Bearer API token, or the session cookie. Runs before every route; the guard in
 * lib/http.ts then checks the route's access rule. Writes carried by a cookie must come from one
 * of our own origins (the token is not a cookie, so a token request cannot be forged by a page).
 */
import type { RequestHandler, Response } from 'express';
import type { Config } from '../config.js';
import type { Db } from '../db.js';
import { HttpError } from '../lib/errors.js';
import { userForToken } from '../services/people/tokens.js';
import { SESSION_COOKIE, type AppLucia } from './lucia.js';
import type { TokenMemory } from './token-memory.js';

declare module 'express-serve-static-core' {
  interface Request {
    authError?: unknown;
  }
}

export function setSessionCookie(res: Response, lucia: AppLucia, sessionId: string, secure: boolean) {
  const cookie = lucia.createSessionCookie(sessionId);
  cookie.attributes.secure = secure || cookie.attributes.secure;
  res.append('Set-Cookie', cookie.serialize());
}

export function clearSessionCookie(res: Response, lucia: AppLucia, secure: boolean) {
  const cookie = lucia.createBlankSessionCookie();
  cookie.attributes.secure = secure || cookie.attributes.secure;
  res.append('Set-Cookie', cookie.serialize());
}

const SAFE = new Set(['GET', 'HEAD', 'OPTIONS']);

export function authenticate(db: Db, lucia: AppLucia, tokens: TokenMemory): RequestHandler {
  return async (req, res, next) => {
    req.auth = null;
    const read = SAFE.has(req.method);
    if (!read) {
      // A change through this instance may revoke a token or change roles: once it is done (or
      // its client gone), forget every check, and keep none begun before (token-memory.ts). A
      // refused change changed nothing.
      res.once('finish', () => res.statusCode < 400 && tokens.forget());
      res.once('close', () => !res.writableFinished && tokens.forget());
    }
    try {
      const header = req.headers.authorization;
      if (header) {
        const token = lucia.readBearerToken(header);
        if (!token) throw new HttpError(401, 'invalid_token', 'The Authorization header must be "Bearer <token>".');
        const recalled = read ? tokens.recall(token) : undefined;
        const at = performance.now();
        const found = recalled ?? (await userForToken(db, token));
        if (!found) throw new HttpError(401, 'invalid_token', 'This API token is not valid: it may have been revoked, or its owner deactivated.');
        if (!recalled) tokens.keep(token, found, at);
        req.auth = { user: found.user, via: 'token', tokenId: found.tokenId };
        return next();
      }
      const sessionId = lucia.readSessionCookie(req.headers.cookie ?? '');
      if (sessionId) {
        const { session, user } = await lucia.validateSession(sessionId);
        if (!session) clearSessionCookie(res, lucia, req.secure);
        else {
          if (session.fresh) setSessionCookie(res, lucia, session.id, req.secure);
          req.auth = { user: { id: user.id, email: user.email, name: user.name, roles: user.roles }, via: 'cookie', sessionId: session.id };
        }
      }
      next();
    } catch (error) {
      // An invalid token is the caller's mistake: say so at once. Anything else (the database is
      // away) is kept, so that public routes still answer and guarded ones answer 503.
      if (error instanceof HttpError) return next(error);
      req.authError = error;
      next();
    }
  };
}


/**
 * Cookie-borne writes need an Origin (or Referer) of ours: the configured public origin or one of
 * ALLOWED_ORIGINS. Never the request's own Host header, which the sender chooses.
 */
export function originCheck(config: Config): RequestHandler {
  const allowed = new Set([config.publicOrigin, ...config.allowedOrigins].map((o) => o.replace(/\/$/, '')));
  return (req, _res, next) => {
    if (SAFE.has(req.method)) return next();
    const hasCookie = (req.headers.cookie ?? '').includes(`${SESSION_COOKIE}=`);
    if (req.headers.authorization && !hasCookie) return next();
    const origin = req.headers.origin ?? (req.headers.referer ? safeOrigin(req.headers.referer) : undefined);
    if (!origin) {
      if (!hasCookie) return next(); // a script signing in, with no cookie to abuse
      return next(new HttpError(403, 'origin_required', 'This request carries a session cookie but no Origin header; browsers send one, scripts should use an API token.'));
    }
    if (allowed.has(origin)) return next();
    next(new HttpError(403, 'origin_mismatch', `Requests from ${origin.slice(0, 100)} may not change anything here.`));
  };
}

function safeOrigin(referer: string): string | undefined {
  try {
    return new URL(referer).origin;
  } catch {
    return undefined;
  }
}

/**
 * Route definitions. Every route is declared with its access rule, so the guard runs for every
 * route (never a check inside a handler), and the same table feeds the OpenAPI document and the
 * role-matrix test.
 */
import express, { type NextFunction, type Request, type RequestHandler, type Response, type Router } from 'express';
import { z } from 'zod';
import { HttpError, forbidden, unauthorized } from './errors.js';
import { allows, type Access } from '../schemas/access.js';
import type { AuthContext } from '../schemas/auth.js';

export type { Access };

export interface RouteContext<B = unknown, Q = unknown> {
  body: B;
  query: Q;
  params: Record<string, string>;
  auth: AuthContext | null;
  req: Request;
  res: Response;
}

export interface RouteSpec<B = any, Q = any> {
  method: 'get' | 'post' | 'put' | 'patch' | 'delete';
  path: string;
  access: Access;
  summary: string;
  body?: z.ZodType<B>;
  query?: z.ZodType<Q>;
  /** Middleware that runs after the guard and before the body is parsed (uploads, body limits). */
  before?: RequestHandler[];
  /** Status for a plain JSON answer (default 200). */
  status?: number;
  /** The handler writes the answer itself (files, streams). */
  raw?: boolean;
  tags?: string[];
  handler: (ctx: RouteContext<B, Q>) => Promise<unknown> | unknown;
}

export type RegisteredRoute = Omit<RouteSpec, 'handler'> & { fullPath: string };

declare module 'express-serve-static-core' {
  interface Request {
    auth?: AuthContext | null;
  }
}

export function guard(access: Access): RequestHandler {
  return (req, _res, next) => {
    if (access === 'public') return next();
    if (req.authError) return next(req.authError);
    const auth = req.auth;
    if (!auth) return next(unauthorized());
    if (allows(access, auth.user.roles)) return next();
    const roles = access as readonly string[];
    next(forbidden('role_required', `This needs the ${roles.join(' or ')} role.`, { roles }));
  };
}

export function zodDetails(error: z.ZodError) {
  return error.issues.map((issue) => ({
    path: issue.path.join('.'),
    message: issue.message,
  }));
}

export function parseOr400<T>(schema: z.ZodType<T>, value: unknown, what: string): T {
  const parsed = schema.safeParse(value);
  if (!parsed.success) {
    const details = zodDetails(parsed.error);
    const first = details[0];
    const where = first?.path ? ` (${first.path})` : '';
    throw new HttpError(400, 'invalid_input', `The ${what} is not valid${where}: ${(first?.message ?? 'see details').replace(/\.$/, '')}.`, details);
  }
  return parsed.data;
}

/**
 * Adds the routes to an Express router that is mounted at `prefix`, and records them in `table`
 * (for the OpenAPI document and the role-matrix test).
 */
export function mount(router: Router, prefix: string, specs: RouteSpec[], table: RegisteredRoute[]) {
  // Routes are grouped by their first path segment into sub-routers, so a request is matched
  // against its own resource's few routes rather than against every route of the API.
  const groups = new Map<string, Router>();
  for (const spec of specs) {
    const segment = spec.path.split('/')[1] ?? '';
    let sub = groups.get(segment);
    if (!sub) {
      sub = express.Router({ mergeParams: true });
      groups.set(segment, sub);
      router.use(`/${segment}`, sub);
    }
    const rest = spec.path.slice(segment.length + 1) || '/';
    register(sub, rest, spec, prefix, table);
  }
}

function register(router: Router, path: string, spec: RouteSpec, prefix: string, table: RegisteredRoute[]) {
  {
    const { handler: _handler, ...rest } = spec;
    table.push({ ...rest, fullPath: prefix + spec.path });
    const handler = async (req: Request, res: Response, next: NextFunction) => {
      try {
        const body = spec.body ? parseOr400(spec.body, req.body ?? {}, 'request body') : req.body;
        const query = spec.query ? parseOr400(spec.query, req.query ?? {}, 'query') : req.query;
        const result = await spec.handler({
          body,
          query,
          params: req.params as Record<string, string>,
          auth: req.auth ?? null,
          req,
          res,
        });
        if (spec.raw) return;
        if (result === undefined) res.status(spec.status ?? 204).end();
        else res.status(spec.status ?? 200).json(result);
      } catch (error) {
        next(error);
      }
    };
    router[spec.method](path, guard(spec.access), ...(spec.before ?? []), handler);
  }
}

/** Parses a positive integer route parameter or answers 404. */
export function idParam(value: string | undefined, what: string): number {
  const n = Number(value);
  if (!Number.isInteger(n) || n <= 0 || n > 2 ** 31) throw new HttpError(404, 'not_found', `${what} was not found.`);
  return n;
}

/** Sends a file made by an exporter as a download. */
export function sendFile(res: Response, file: { filename: string; contentType: string; body: Buffer | string }) {
  res.setHeader('Content-Type', file.contentType);
  res.setHeader('Content-Disposition', `attachment; filename="${file.filename}"`);
  res.send(file.body);
}

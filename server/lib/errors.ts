/** Errors that carry the API.md error shape: {"error": {"code", "message", "details"}}. */
export class HttpError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly details?: unknown,
    readonly headers?: Record<string, string>,
  ) {
    super(message);
    this.name = 'HttpError';
  }
}

export const badRequest = (code: string, message: string, details?: unknown) => new HttpError(400, code, message, details);
export const unauthorized = (message = 'Sign in to use this.') => new HttpError(401, 'not_signed_in', message);
export const forbidden = (code: string, message: string, details?: unknown) => new HttpError(403, code, message, details);
export const notFound = (what: string) => new HttpError(404, 'not_found', `${what} was not found.`);
export const conflict = (code: string, message: string, details?: unknown) => new HttpError(409, code, message, details);
export const gone = (code: string, message: string) => new HttpError(410, code, message);
export const unprocessable = (code: string, message: string, details?: unknown) => new HttpError(422, code, message, details);

export type { FileProblem } from '../schemas/catalogue.js';

/**
 * The one place where an error becomes an answer in the API.md shape,
 * {"error": {"code", "message", "details"}}: for plain JSON answers (the Express error handler
 * below) and for streamed NDJSON answers (lib/stream.ts writes the same body as its last line).
 * Analysis errors are bad input (400); database outages are 503; anything unexpected is a 500
 * with a plain sentence, and its stack goes to the log only.
 */
import type { ErrorRequestHandler } from 'express';
import multer from 'multer';
import { AnalysisError } from '../analysis/errors.js';
import type { Config } from '../config.js';
import { isDbUnavailable } from '../db.js';
import { HttpError } from './errors.js';
import { conflictExhausted, isDeadlock } from './retry.js';
import { duringShutdown, SHUTTING_DOWN_MESSAGE } from './drain.js';
import type { Logger } from './logger.js';

export interface ErrorAnswer {
  status: number;
  body: { error: { code: string; message: string; details?: unknown } };
  headers?: Record<string, string>;
}

/** Request size limits, named in the 413 messages. */
export type Limits = Pick<Config, 'maxJsonBytes' | 'maxUploadBytes'>;

const mb = (bytes: number) => Math.round(bytes / 1048576);

export function errorAnswer(err: unknown, limits?: Limits): ErrorAnswer {
  const answer = (status: number, code: string, message: string, details?: unknown, headers?: Record<string, string>): ErrorAnswer => ({
    status,
    body: { error: { code, message, ...(details === undefined ? {} : { details }) } },
    ...(headers ? { headers } : {}),
  });
  if (err instanceof HttpError) return answer(err.status, err.code, err.message, err.details, err.headers);
  if (err instanceof AnalysisError) return answer(400, err.code, err.message, err.details);
  const type = (err as { type?: string } | null)?.type;
  if (type === 'entity.too.large') {
    return answer(413, 'too_large', `The request body is larger than the limit${limits ? ` of ${mb(limits.maxJsonBytes)} MB` : ''}; send less data per request.`);
  }
  if (type === 'entity.parse.failed') return answer(400, 'invalid_json', 'The request body is not valid JSON.');
  if (type === 'charset.unsupported' || type === 'encoding.unsupported') return answer(415, 'unsupported_encoding', 'Send the request body as UTF-8 JSON.');
  if (err instanceof multer.MulterError) {
    if (err.code === 'LIMIT_FILE_SIZE') return answer(413, 'file_too_large', `The file is larger than the limit${limits ? ` of ${mb(limits.maxUploadBytes)} MB` : ''}.`);
    return answer(400, 'invalid_upload', `The upload is not valid (${err.message}); send one file in the field "file".`);
  }
  // A single statement outside transaction() that lost a deadlock or a cluster certification.
  if (isDeadlock(err)) {
    const e = conflictExhausted(1);
    return answer(e.status, e.code, e.message, undefined, e.headers);
  }
  // Express's own client errors (a bad path encoding, a static file refused): their status, a plain
  // sentence, nothing logged.
  const client = err as { status?: number; statusCode?: number; expose?: boolean } | null;
  const clientStatus = client?.status ?? client?.statusCode;
  if (client?.expose && typeof clientStatus === 'number' && clientStatus >= 400 && clientStatus < 500) {
    return clientStatus === 404 ? answer(404, 'not_found', 'There is nothing at this address.') : answer(clientStatus, 'bad_request', 'The request could not be served as it was sent.');
  }
  if (isDbUnavailable(err)) {
    return answer(503, 'database_unavailable', 'The database is not reachable right now. Nothing was changed; try again in a moment.', undefined, { 'Retry-After': '5' });
  }
  return answer(500, 'internal_error', 'Something went wrong on the server. The error was logged; try again, and tell an administrator if it persists.');
}

/** The Express error handler: every error thrown or passed on by a route ends here. */
export function errorHandler(logger: Logger, limits: Limits): ErrorRequestHandler {
  return (err, req, res, _next) => {
    const { status, body, headers } = errorAnswer(err, limits);
    const closing = duringShutdown(req);
    if (closing && body.error.code === 'database_unavailable') {
      // Waited for a database connection past the pool's timeout while the server drains.
      body.error = { code: 'shutting_down', message: SHUTTING_DOWN_MESSAGE };
    }
    if (status >= 500) (req.log ?? logger)[closing && status === 503 ? 'warn' : 'error']({ err }, 'request failed');
    if (res.headersSent) {
      res.destroy();
      return;
    }
    if (headers) res.set(headers);
    res.status(status).json(body);
  };
}

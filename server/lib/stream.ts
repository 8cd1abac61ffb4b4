/**
 * Long work reports progress as NDJSON (one JSON object per line) when the client asks with
 * `Accept: application/x-ndjson`: {"type":"progress",…} lines, then one {"type":"result"} or
 * {"type":"error"} line. The status is 200 once streaming starts; errors after that are in-band.
 */
import type { Request, Response } from 'express';
import { HttpError } from './errors.js';
import { isDbUnavailable } from '../db.js';

export function wantsStream(req: Request) {
  return (req.headers.accept ?? '').includes('application/x-ndjson');
}

type Send = (event: Record<string, unknown>, items?: string[]) => void;

export async function streamNdjson(res: Response, work: (send: Send) => Promise<void>) {
  res.status(200);
  res.setHeader('Content-Type', 'application/x-ndjson; charset=utf-8');
  res.setHeader('Cache-Control', 'no-store');
  res.setHeader('X-Accel-Buffering', 'no');
  res.flushHeaders();
  const send: Send = (event, items) => {
    let line = JSON.stringify(event);
    // Large pre-serialised item lists are spliced in without parsing them again.
    if (items) line = line.replace('"__ITEMS__"', `[${items.join(',')}]`);
    res.write(line + '\n');
  };
  try {
    await work(send);
  } catch (error) {
    const e =
      error instanceof HttpError
        ? { status: error.status, error: { code: error.code, message: error.message, ...(error.details === undefined ? {} : { details: error.details }) } }
        : isDbUnavailable(error)
          ? { status: 503, error: { code: 'database_unavailable', message: 'The database is not reachable right now. Nothing was changed; try again in a moment.' } }
          : { status: 500, error: { code: 'internal_error', message: 'Something went wrong on the server; the error was logged.' } };
    if (e.status >= 500) res.req.log?.error({ err: error }, 'streamed request failed');
    send({ type: 'error', ...e });
  }
  res.end();
}

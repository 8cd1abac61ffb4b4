/**
 * Long work reports progress as NDJSON (one JSON object per line) when the client asks with
 * `Accept: application/x-ndjson`: {"type":"progress",…} lines, then one {"type":"result"} or
 * {"type":"error"} line. The status is 200 once streaming starts; errors after that are in-band,
 * with the status and body the plain answer would have had (lib/error-answer.ts).
 */
import type { Request, Response } from 'express';
import { errorAnswer } from './error-answer.js';

export function wantsStream(req: Request) {
  return (req.headers.accept ?? '').includes('application/x-ndjson');
}

/** Writes one event; `items`, when given, replaces the placeholder "__ITEMS__" unparsed. */
export type Send = (event: Record<string, unknown>, items?: string[]) => void;

/** A progress callback as services take it: phase, done, total. */
export type Progress = (phase: string, done: number, total: number) => void;

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
    const { status, body } = errorAnswer(error);
    if (status >= 500) res.req.log?.error({ err: error }, 'streamed request failed');
    send({ type: 'error', status, ...body });
  }
  res.end();
}

/**
 * Answers `work` as NDJSON with progress lines when the client asks for a stream, else as one
 * JSON answer with `status`. `work` gets a progress callback only when streaming.
 */
export async function answerWithProgress(req: Request, res: Response, status: number, work: (progress?: Progress) => Promise<unknown>) {
  if (wantsStream(req)) {
    await streamNdjson(res, async (send) => {
      const result = await work((phase, done, total) => send({ type: 'progress', phase, done, total }));
      send({ type: 'result', result });
    });
    return;
  }
  res.status(status).json(await work());
}

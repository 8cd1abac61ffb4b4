/**
 * Graceful drain of the HTTP server on SIGTERM or SIGINT.
 *
 * 1. The listener closes at once: new connections are refused, so a load balancer's next try
 *    goes to another instance. Idle keep-alive connections are closed.
 * 2. Every request in flight runs to its end and gets its answer, marked `Connection: close` when
 *    its headers are not out yet. A request that waits for a database connection gets one as the
 *    others finish, or a 503 `shutting_down` in the error shape when the pool's acquire timeout
 *    passes. A request arriving on a connection that is still open is refused with that 503.
 * 3. When nothing is in flight, `close` runs (worker threads, database pool, mail): the pool is
 *    closed only once no request waits for it, so no request is aborted half-way.
 * 4. If requests are still running after the grace period (a very large load, say), the server
 *    logs how many and closes their connections; the database rolls their transactions back,
 *    so a load is then stored whole or not at all.
 */
import type { IncomingMessage, RequestListener, Server, ServerResponse } from 'node:http';
import type { Logger } from './logger.js';

const SHUTTING_DOWN = Symbol('tidegauge.shuttingDown');

/** True for a request that was in flight, or arrived, after the drain began. */
export function duringShutdown(req: IncomingMessage): boolean {
  return (req as unknown as Record<symbol, unknown>)[SHUTTING_DOWN] === true;
}

export const SHUTTING_DOWN_MESSAGE = 'This server is shutting down and could not finish the request; nothing was changed. Send it again: another instance will answer.';

function refuse(res: ServerResponse) {
  res.writeHead(503, {
    'Content-Type': 'application/json; charset=utf-8',
    'Cache-Control': 'no-store',
    'X-Content-Type-Options': 'nosniff',
    'Retry-After': '5',
    Connection: 'close',
  });
  res.end(JSON.stringify({ error: { code: 'shutting_down', message: SHUTTING_DOWN_MESSAGE } }));
}

export interface DrainResult {
  /** Requests still running when the grace period ended (their connections were closed). */
  unfinished: number;
  /** Milliseconds from the start of the drain to the end. */
  ms: number;
}

export interface Drain {
  /** Wraps the app: counts the requests in flight and refuses new ones once draining. */
  listener(app: RequestListener): RequestListener;
  /** Runs the drain described above; resolves when the server is closed. */
  shutdown(server: Server, options: { graceMs: number; close: () => Promise<unknown>; logger: Logger }): Promise<DrainResult>;
  readonly inFlight: number;
}

export function createDrain(): Drain {
  const inflight = new Map<ServerResponse, IncomingMessage>();
  let draining = false;
  let onIdle: (() => void) | null = null;

  return {
    get inFlight() {
      return inflight.size;
    },
    listener: (app) => (req, res) => {
      if (draining) {
        (req as unknown as Record<symbol, unknown>)[SHUTTING_DOWN] = true;
        refuse(res);
        return;
      }
      inflight.set(res, req);
      res.once('close', () => {
        inflight.delete(res);
        if (inflight.size === 0) onIdle?.();
      });
      app(req, res);
    },
    async shutdown(server, { graceMs, close, logger }) {
      const started = Date.now();
      draining = true;
      for (const [res, req] of inflight) {
        (req as unknown as Record<symbol, unknown>)[SHUTTING_DOWN] = true;
        if (!res.headersSent) res.setHeader('Connection', 'close');
      }
      server.close();
      server.closeIdleConnections();
      if (inflight.size) logger.info(`waiting for ${inflight.size} request${inflight.size === 1 ? '' : 's'} in flight (at most ${Math.round(graceMs / 1000)} s)`);
      const idle = new Promise<boolean>((resolve) => {
        if (inflight.size === 0) resolve(true);
        else onIdle = () => resolve(true);
      });
      let timer: NodeJS.Timeout | undefined;
      const inTime = await Promise.race([idle, new Promise<boolean>((resolve) => (timer = setTimeout(() => resolve(false), graceMs)))]);
      clearTimeout(timer);
      const unfinished = inflight.size;
      if (inTime) await close();
      else logger.warn(`${unfinished} request${unfinished === 1 ? ' was' : 's were'} still running after the ${Math.round(graceMs / 1000)} s grace period; closing their connections (the database rolls back what they had not committed)`);
      server.closeAllConnections();
      return { unfinished, ms: Date.now() - started };
    },
  };
}

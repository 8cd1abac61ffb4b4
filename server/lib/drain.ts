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
 *    closed only once no request holds or waits for a connection, including requests whose
 *    client has gone away (a load generator that stopped), so nothing is aborted half-way.
 * 4. If requests are still running after the grace period (a very large load, say), the server
 *    logs how many and closes their connections; the database rolls their transactions back,
 *    so a load is then stored whole or not at all.
 */
import type { IncomingMessage, RequestListener, Server, ServerResponse } from 'node:http';
import type { Logger } from './logger.js';

/** Servers that are draining. */
const draining = new WeakSet<object>();

/** True for a request on a server that is draining (it arrived before or during the drain). */
export function duringShutdown(req: IncomingMessage): boolean {
  const server = (req.socket as { server?: object } | undefined)?.server;
  return !!server && draining.has(server);
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
  /** Requests still running when the grace period ended (their connections were closed), plus 1 if other work was. */
  unfinished: number;
  /** Milliseconds from the start of the drain to the end. */
  ms: number;
}

export interface Drain {
  /** Wraps the app: counts the requests in flight and refuses new ones once draining. */
  listener(app: RequestListener): RequestListener;
  /**
   * Runs the drain described above; resolves when the server is closed. `busy` tells whether
   * work continues without a client to answer (a request whose client went away still holds or
   * waits for a database connection, a batch still runs on a worker thread): `close` waits for it.
   */
  shutdown(server: Server, options: { graceMs: number; close: () => Promise<unknown>; busy?: () => boolean; logger: Logger }): Promise<DrainResult>;
  readonly inFlight: number;
}

export function createDrain(): Drain {
  const inflight = new Set<ServerResponse>();
  let closing = false;

  return {
    get inFlight() {
      return inflight.size;
    },
    listener: (app) => (req, res) => {
      if (closing) {
        refuse(res);
        return;
      }
      inflight.add(res);
      res.once('close', () => inflight.delete(res));
      app(req, res);
    },
    async shutdown(server, { graceMs, close, busy = () => false, logger }) {
      const started = Date.now();
      closing = true;
      draining.add(server);
      for (const res of inflight) if (!res.headersSent) res.setHeader('Connection', 'close');
      server.close();
      server.closeIdleConnections();
      if (inflight.size) logger.info(`waiting for ${inflight.size} request${inflight.size === 1 ? '' : 's'} in flight (at most ${Math.round(graceMs / 1000)} s)`);
      while ((inflight.size > 0 || busy()) && Date.now() - started < graceMs) await new Promise((r) => setTimeout(r, 25));
      const unfinished = inflight.size + (busy() ? 1 : 0);
      if (unfinished === 0) await close();
      else logger.warn(`work was still running after the ${Math.round(graceMs / 1000)} s grace period (${inflight.size} request${inflight.size === 1 ? '' : 's'} in flight); closing the connections (the database rolls back what was not committed)`);
      server.closeAllConnections();
      return { unfinished, ms: Date.now() - started };
    },
  };
}

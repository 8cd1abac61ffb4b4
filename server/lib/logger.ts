import pino, { type Logger } from 'pino';

export type { Logger };

export function createLogger(level: string, destination?: pino.DestinationStream): Logger {
  return pino(
    {
      level,
      base: { service: 'tidegauge' },
      redact: { paths: ['req.headers.cookie', 'req.headers.authorization', 'res.headers["set-cookie"]'], remove: true },
    },
    destination,
  );
}

/**
 * A URL as logs may keep it: the secret of an invitation or password-reset link (in the API's
 * lookup path, the client's /invite/… and /reset-password/… pages, or a `token` query parameter)
 * is replaced by "[redacted]", so whoever reads the logs cannot use the link.
 */
export function redactUrl(url: string | undefined): string | undefined {
  if (!url) return url;
  return url
    .replace(/(\/(?:invitations\/lookup|invite|reset-password)\/)[^/?#]+/gi, '$1[redacted]')
    .replace(/([?&](?:token|code|key)=)[^&#]*/gi, '$1[redacted]');
}

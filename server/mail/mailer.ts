/** Outgoing mail through nodemailer: SMTP_URL in production, the local fake server otherwise. */
import nodemailer, { type Transporter } from 'nodemailer';
import type { Config } from '../config.js';
import type { Logger } from '../lib/logger.js';

export interface MailMessage {
  to: string | string[];
  subject: string;
  text: string;
  html?: string;
}

export interface Mailer {
  /** Sends a message; resolves false (and logs) when the mail could not be handed over. */
  send(message: MailMessage): Promise<boolean>;
  enabled: boolean;
}

export function createMailer(config: Config, logger: Logger, fakePort?: number): Mailer {
  let transport: Transporter | null = null;
  if (config.mail.mode === 'smtp') transport = nodemailer.createTransport(config.mail.smtpUrl);
  else if (config.mail.mode === 'fake') {
    transport = nodemailer.createTransport({ host: '127.0.0.1', port: fakePort ?? config.mail.fakePort, secure: false, ignoreTLS: true, connectionTimeout: 5000 });
  }
  return {
    enabled: transport !== null,
    async send(message) {
      if (!transport) {
        logger.warn({ subject: message.subject }, 'mail is off (MAIL_MODE=off): message not sent');
        return false;
      }
      try {
        await transport.sendMail({ from: config.mail.from, ...message });
        return true;
      } catch (error) {
        logger.error({ err: error, subject: message.subject }, 'mail could not be sent');
        return false;
      }
    },
  };
}

const esc = (s: string) => s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);

/** A plain, readable message in both text and HTML, with one action link. */
export function composeMail(opts: { greeting: string; paragraphs: string[]; action?: { label: string; url: string }; footer?: string }) {
  const text = [opts.greeting, '', ...opts.paragraphs.flatMap((p) => [p, '']), ...(opts.action ? [`${opts.action.label}: ${opts.action.url}`, ''] : []), opts.footer ?? '— Tidegauge'].join('\n');
  const html = `<div style="font-family:Georgia,serif;color:#1E2430;max-width:560px">
<p>${esc(opts.greeting)}</p>
${opts.paragraphs.map((p) => `<p>${esc(p)}</p>`).join('\n')}
${opts.action ? `<p><a href="${esc(opts.action.url)}" style="color:#0E6E68">${esc(opts.action.label)}</a></p>` : ''}
<p style="color:#4B5263">${esc(opts.footer ?? '— Tidegauge')}</p></div>`;
  return { text, html };
}

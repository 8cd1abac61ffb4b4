/**
 * The local fake mail server for development and tests (never production): a real SMTP server
 * (smtp-server) on 127.0.0.1 that accepts every message and keeps the last few hundred in memory,
 * parsed with mailparser, for the Mailbox page and for tests to read.
 */
import type { AddressInfo } from 'node:net';
import { simpleParser } from 'mailparser';
import { SMTPServer } from 'smtp-server';
import type { MailboxMessage } from '../schemas/people.js';

export type StoredMessage = MailboxMessage;

export interface FakeMailServer {
  port: number;
  messages(): StoredMessage[];
  /** Resolves with the first message (newest first) that matches, waiting up to `timeoutMs`. */
  waitFor(match: (m: StoredMessage) => boolean, timeoutMs?: number): Promise<StoredMessage>;
  clear(): void;
  close(): Promise<void>;
}

const KEEP = 500;

export async function startFakeMailServer(port = 0, host = '127.0.0.1'): Promise<FakeMailServer> {
  const store: StoredMessage[] = [];
  const waiters = new Set<() => void>();
  let nextId = 1;
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS', 'AUTH'],
    logger: false,
    banner: 'Tidegauge fake mail server (development and tests only)',
    size: 5 * 1024 * 1024,
    onData(stream, session, callback) {
      simpleParser(stream)
        .then((parsed) => {
          const to = session.envelope.rcptTo.map((r) => r.address);
          store.unshift({
            id: nextId++,
            receivedAt: new Date().toISOString(),
            from: session.envelope.mailFrom ? session.envelope.mailFrom.address : '',
            to,
            subject: parsed.subject ?? '',
            text: parsed.text ?? '',
            html: typeof parsed.html === 'string' ? parsed.html : null,
          });
          store.length = Math.min(store.length, KEEP);
          for (const w of waiters) w();
          callback();
        })
        .catch((error) => callback(error));
    },
  });
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(port, host, () => resolve());
  });
  server.on('error', () => {});
  const actualPort = (server.server.address() as AddressInfo).port;
  return {
    port: actualPort,
    messages: () => [...store],
    clear: () => {
      store.length = 0;
    },
    waitFor(match, timeoutMs = 10_000) {
      return new Promise((resolve, reject) => {
        const check = () => {
          const hit = store.find(match);
          if (hit) {
            waiters.delete(check);
            clearTimeout(timer);
            resolve(hit);
          }
        };
        const timer = setTimeout(() => {
          waiters.delete(check);
          reject(new Error('no matching message arrived at the fake mail server'));
        }, timeoutMs);
        waiters.add(check);
        check();
      });
    },
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}

/**
 * The fake mail server as the app starts it: on `port`, or — when another program already holds
 * that port — on a free port chosen by the system, so that mail never goes to whatever listens
 * there. `moved` says when that happened (the caller says which port it took). Any other failure
 * to listen is thrown.
 */
export async function startLocalMailbox(port: number): Promise<{ mailbox: FakeMailServer; moved: boolean }> {
  try {
    return { mailbox: await startFakeMailServer(port), moved: false };
  } catch (error) {
    if ((error as { code?: string }).code !== 'EADDRINUSE' || port === 0) throw error;
    return { mailbox: await startFakeMailServer(0), moved: true };
  }
}

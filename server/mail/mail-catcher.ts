import { simpleParser, type AddressObject } from 'mailparser';
import type { AddressInfo } from 'node:net';
import { SMTPServer } from 'smtp-server';
import type { Logger } from '../logger';
import type { CaughtMail } from '../models/caught-mail';

/** Largest message the catcher accepts (alarm e-mail is a few KiB). */
export const MAX_MESSAGE_BYTES = 1024 * 1024;

export interface MailCatcher {
  /** The port it listens on (useful when started on port 0). */
  port(): number;
  stop(): Promise<void>;
}

function addresses(a: AddressObject | AddressObject[] | undefined): string {
  if (!a) return '';
  return (Array.isArray(a) ? a : [a]).map((x) => x.text).join(', ');
}

/**
 * The local mail catcher: a plain SMTP server on loopback that keeps every message in `caught_mail`
 * in place of a mail service. No AUTH, no STARTTLS (loopback only), messages above the size limit refused.
 */
export async function startMailCatcher(opts: { port: number; host?: string; model: typeof CaughtMail; log: Logger }): Promise<MailCatcher> {
  const { model, log } = opts;
  const server = new SMTPServer({
    disabledCommands: ['STARTTLS', 'AUTH'],
    authOptional: true,
    size: MAX_MESSAGE_BYTES,
    banner: 'Jacketwatch mail catcher',
    logger: false,
    onData(stream, session, callback) {
      simpleParser(stream)
        .then(async (mail) => {
          // smtp-server sets this once the stream ended past the limit
          if ((stream as unknown as { sizeExceeded?: boolean }).sizeExceeded) {
            const err = new Error('message exceeds the size limit') as Error & { responseCode: number };
            err.responseCode = 552;
            return callback(err);
          }
          const envelopeTo = session.envelope.rcptTo.map((r) => r.address).join(', ');
          await model.create({
            to: addresses(mail.to) || envelopeTo,
            from: addresses(mail.from) || (session.envelope.mailFrom ? session.envelope.mailFrom.address : null),
            subject: mail.subject ?? null,
            text: mail.text ?? null,
            html: typeof mail.html === 'string' ? mail.html : null,
            messageId: mail.messageId ?? null,
            receivedAt: new Date(),
          });
          callback();
        })
        .catch((err: Error) => {
          log.warn('mail catcher could not keep a message', err.message);
          const e = new Error('message could not be stored') as Error & { responseCode: number };
          e.responseCode = 451;
          callback(e);
        });
    },
  });
  server.on('error', (err) => log.warn('mail catcher error', err.message));
  await new Promise<void>((resolve, reject) => {
    const onError = (err: Error) => reject(err);
    server.server.once('error', onError);
    server.listen(opts.port, opts.host ?? '127.0.0.1', () => {
      server.server.off('error', onError);
      resolve();
    });
  });
  const port = (server.server.address() as AddressInfo).port;
  log.info(`mail catcher on 127.0.0.1:${port}`);
  return {
    port: () => port,
    stop: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}

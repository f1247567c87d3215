import nodemailer, { type Transporter } from 'nodemailer';
import { randomUUID } from 'node:crypto';
import { Op } from 'sequelize';
import type { Config } from '../config';
import type { Logger } from '../logger';
import type { OutboxMessage } from '../models/outbox-message';

export interface OutgoingMail {
  to: string;
  subject: string;
  text: string;
  html?: string | null;
  alarmId?: number | null;
}

export interface OutboxOptions {
  config: Pick<Config, 'smtpHost' | 'smtpPort' | 'smtpUser' | 'smtpPass' | 'smtpSecure' | 'mailFrom'>;
  model: typeof OutboxMessage;
  log: Logger;
  /** First retry delay; doubles with each failed attempt up to retryMaxMs. */
  retryBaseMs?: number;
  retryMaxMs?: number;
  /** How often the sender looks for due messages (it also wakes at once when one is queued). */
  pollMs?: number;
  /** Limit for connecting, the greeting and each answer of the relay (MAIL_TIMEOUT_S). */
  timeoutMs?: number;
  /** Messages on their way at once, each on its own connection (MAIL_PARALLEL). */
  parallel?: number;
}

export interface Outbox {
  /** Store the message; the sender delivers it as soon as the relay takes it. */
  enqueue(mail: OutgoingMail): Promise<OutboxMessage>;
  /** Start every due message now (also used by tests). Resolves when those on their way are done. */
  flush(): Promise<void>;
  stop(): Promise<void>;
}

/**
 * Several servers share one outbox: a message is sent by the one whose conditional update moves its
 * next attempt ahead by the lease; the others see it changed and leave it. If that server dies
 * mid-send (or is killed and restarted), the message is due again once the lease ends, with its one
 * Message-ID. The lease follows the relay timeout: a send waits for the connection, the greeting and
 * five answers (EHLO, MAIL, RCPT, DATA, end of data), each limited by the timeout, so CLAIM_TIMEOUTS
 * timeouts outlast any send that has not failed by itself (5 s timeout: a 40 s lease).
 */
export const CLAIM_TIMEOUTS = 8;

/** Exponential back-off: base, 2 base, 4 base, ... at most max. */
export function retryDelayMs(attempts: number, baseMs: number, maxMs: number): number {
  return Math.min(maxMs, baseMs * 2 ** Math.max(0, attempts - 1));
}

function createTransport(config: OutboxOptions['config'], timeoutMs: number): Transporter {
  // one limit for connecting, the greeting and every wait for an answer: a relay that takes the
  // connection and then goes silent costs that one message a few seconds, not the queue
  const timeouts = { connectionTimeout: timeoutMs, greetingTimeout: timeoutMs, socketTimeout: timeoutMs };
  if (config.smtpHost) {
    return nodemailer.createTransport({
      host: config.smtpHost,
      port: config.smtpPort,
      secure: config.smtpSecure,
      auth: config.smtpUser ? { user: config.smtpUser, pass: config.smtpPass ?? '' } : undefined,
      ...timeouts,
    });
  }
  // the local mail catcher on loopback: plain SMTP, no TLS
  return nodemailer.createTransport({ host: '127.0.0.1', port: config.smtpPort, secure: false, ignoreTLS: true, ...timeouts });
}

/** A Message-ID in the sender's domain; generated once per outbox row and kept across retries. */
export function newMessageId(mailFrom: string): string {
  const at = mailFrom.lastIndexOf('@');
  const domain = at >= 0 ? mailFrom.slice(at + 1).replace(/[>\s]/g, '') || 'jacketwatch.invalid' : 'jacketwatch.invalid';
  return `<${randomUUID()}@${domain}>`;
}

/**
 * Messages go to the `outbox` table first; a sender delivers them and retries with back-off, so none is lost.
 * Up to `parallel` messages are on their way at once, each on its own connection, so a relay that hangs
 * on one message holds only that one until its timeout; the others go on.
 */
export function startOutbox(opts: OutboxOptions): Outbox {
  const { model, log, config } = opts;
  const base = opts.retryBaseMs ?? 5000;
  const max = opts.retryMaxMs ?? 10 * 60 * 1000;
  const parallel = Math.max(1, opts.parallel ?? 4);
  const timeoutMs = opts.timeoutMs ?? 5000;
  const claimMs = CLAIM_TIMEOUTS * timeoutMs;
  const transport = createTransport(config, timeoutMs);
  const inFlight = new Map<number, Promise<void>>();
  let picking: Promise<void> | null = null;
  let again = false;
  let stopped = false;

  /** True when this sender took the message: still unsent and untouched since it was read. */
  async function claim(msg: OutboxMessage): Promise<boolean> {
    const [taken] = await model.update(
      { nextAttemptAt: new Date(Date.now() + claimMs) },
      { where: { id: msg.id, sentAt: null, nextAttemptAt: msg.nextAttemptAt } },
    );
    return taken === 1;
  }

  async function sendOne(msg: OutboxMessage): Promise<void> {
    if (!(await claim(msg))) return;
    try {
      if (!msg.messageId) await msg.update({ messageId: newMessageId(config.mailFrom) });
      await transport.sendMail({
        from: config.mailFrom,
        to: msg.to,
        subject: msg.subject,
        text: msg.text,
        html: msg.html ?? undefined,
        messageId: msg.messageId!,
      });
      await msg.update({ sentAt: new Date(), attempts: msg.attempts + 1, lastError: null });
    } catch (err) {
      const attempts = msg.attempts + 1;
      const wait = retryDelayMs(attempts, base, max);
      const text = (err as Error).message.slice(0, 1000);
      log.warn(`mail ${msg.id} not sent (attempt ${attempts}), retry in ${Math.round(wait / 1000)} s`, text);
      await msg.update({ attempts, lastError: text, nextAttemptAt: new Date(Date.now() + wait) });
    }
  }

  /** Start due messages (not already on their way) while there are free places. */
  async function pick(): Promise<void> {
    do {
      again = false;
      const free = parallel - inFlight.size;
      if (free <= 0 || stopped) return;
      const busy = [...inFlight.keys()];
      const due = await model.findAll({
        where: { sentAt: null, nextAttemptAt: { [Op.lte]: new Date() }, ...(busy.length ? { id: { [Op.notIn]: busy } } : {}) },
        order: [['id', 'ASC']],
        limit: free,
      });
      for (const msg of due) {
        if (stopped) return;
        const sending = sendOne(msg)
          .catch((err) => log.error(`outbox: mail ${msg.id} failed`, err))
          .finally(() => {
            inFlight.delete(msg.id);
            if (!stopped) void startDue();
          });
        inFlight.set(msg.id, sending);
      }
    } while (again && !stopped);
  }

  function startDue(): Promise<void> {
    if (picking) {
      again = true;
      return picking;
    }
    picking = pick()
      .catch((err) => log.error('outbox pass failed', err))
      .finally(() => {
        picking = null;
      });
    return picking;
  }

  /** Attempt every message due when called (a few at a time), and wait for those attempts. */
  async function flush(): Promise<void> {
    const asked = new Date();
    for (;;) {
      await startDue();
      if (stopped) return;
      // a finished send starts the next due one: wait until nothing is on its way any more
      if (inFlight.size) {
        await Promise.all([...inFlight.values()]);
        continue;
      }
      // a sent message has sentAt, a failed or claimed one a later nextAttemptAt: none left means each was tried
      if (!(await model.count({ where: { sentAt: null, nextAttemptAt: { [Op.lte]: asked } } }))) return;
    }
  }

  const timer = setInterval(() => void startDue(), opts.pollMs ?? 1000);
  timer.unref();

  return {
    async enqueue(mail) {
      const row = await model.create({
        to: mail.to,
        subject: mail.subject.slice(0, 300),
        text: mail.text,
        html: mail.html ?? null,
        alarmId: mail.alarmId ?? null,
        messageId: newMessageId(config.mailFrom),
        nextAttemptAt: new Date(),
      });
      void startDue();
      return row;
    },
    flush,
    async stop() {
      stopped = true;
      clearInterval(timer);
      if (picking) await picking;
      await Promise.all([...inFlight.values()]);
      transport.close();
    },
  };
}

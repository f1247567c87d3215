import nodemailer, { type Transporter } from 'nodemailer';
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
}

export interface Outbox {
  /** Store the message; the sender delivers it as soon as the relay takes it. */
  enqueue(mail: OutgoingMail): Promise<OutboxMessage>;
  /** Try every due message now (also used by tests). Resolves when this pass is done. */
  flush(): Promise<void>;
  stop(): Promise<void>;
}

/**
 * Several servers share one outbox: a message is sent by the one whose conditional update moves its
 * next attempt this far ahead (a lease); the others see it changed and leave it. If that server dies
 * mid-send, the message is due again once the lease ends.
 */
export const CLAIM_MS = 120_000;

/** Exponential back-off: base, 2 base, 4 base, ... at most max. */
export function retryDelayMs(attempts: number, baseMs: number, maxMs: number): number {
  return Math.min(maxMs, baseMs * 2 ** Math.max(0, attempts - 1));
}

function createTransport(config: OutboxOptions['config']): Transporter {
  if (config.smtpHost) {
    return nodemailer.createTransport({
      host: config.smtpHost,
      port: config.smtpPort,
      secure: config.smtpSecure,
      auth: config.smtpUser ? { user: config.smtpUser, pass: config.smtpPass ?? '' } : undefined,
      connectionTimeout: 10000,
      greetingTimeout: 10000,
      socketTimeout: 20000,
    });
  }
  // the local mail catcher on loopback: plain SMTP, no TLS
  return nodemailer.createTransport({
    host: '127.0.0.1',
    port: config.smtpPort,
    secure: false,
    ignoreTLS: true,
    connectionTimeout: 5000,
    greetingTimeout: 5000,
    socketTimeout: 10000,
  });
}

/** Messages go to the `outbox` table first; a sender loop delivers them and retries with back-off, so none is lost. */
export function startOutbox(opts: OutboxOptions): Outbox {
  const { model, log, config } = opts;
  const base = opts.retryBaseMs ?? 5000;
  const max = opts.retryMaxMs ?? 10 * 60 * 1000;
  const transport = createTransport(config);
  let running: Promise<void> | null = null;
  let again = false;
  let stopped = false;

  /** True when this sender took the message: still unsent and untouched since it was read. */
  async function claim(msg: OutboxMessage): Promise<boolean> {
    const [taken] = await model.update(
      { nextAttemptAt: new Date(Date.now() + CLAIM_MS) },
      { where: { id: msg.id, sentAt: null, nextAttemptAt: msg.nextAttemptAt } },
    );
    return taken === 1;
  }

  async function sendOne(msg: OutboxMessage): Promise<void> {
    if (!(await claim(msg))) return;
    try {
      await transport.sendMail({ from: config.mailFrom, to: msg.to, subject: msg.subject, text: msg.text, html: msg.html ?? undefined });
      await msg.update({ sentAt: new Date(), attempts: msg.attempts + 1, lastError: null });
    } catch (err) {
      const attempts = msg.attempts + 1;
      const wait = retryDelayMs(attempts, base, max);
      const text = (err as Error).message.slice(0, 1000);
      log.warn(`mail ${msg.id} not sent (attempt ${attempts}), retry in ${Math.round(wait / 1000)} s`, text);
      await msg.update({ attempts, lastError: text, nextAttemptAt: new Date(Date.now() + wait) });
    }
  }

  async function pass(): Promise<void> {
    do {
      again = false;
      const due = await model.findAll({
        where: { sentAt: null, nextAttemptAt: { [Op.lte]: new Date() } },
        order: [['id', 'ASC']],
        limit: 50,
      });
      for (const msg of due) {
        if (stopped) return;
        await sendOne(msg);
      }
    } while (again && !stopped);
  }

  function flush(): Promise<void> {
    if (running) {
      again = true;
      return running;
    }
    running = pass()
      .catch((err) => log.error('outbox pass failed', err))
      .finally(() => {
        running = null;
      });
    return running;
  }

  const timer = setInterval(() => void flush(), opts.pollMs ?? 1000);
  timer.unref();

  return {
    async enqueue(mail) {
      const row = await model.create({
        to: mail.to,
        subject: mail.subject.slice(0, 300),
        text: mail.text,
        html: mail.html ?? null,
        alarmId: mail.alarmId ?? null,
        nextAttemptAt: new Date(),
      });
      void flush();
      return row;
    },
    flush,
    async stop() {
      stopped = true;
      clearInterval(timer);
      if (running) await running;
      transport.close();
    },
  };
}

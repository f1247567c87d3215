/** Mail catcher and outbox over real SMTP on loopback (random ports), into a real SQLite file. */
import net from 'node:net';
import nodemailer from 'nodemailer';
import { startMailCatcher, MAX_MESSAGE_BYTES, type MailCatcher } from '../../server/mail/mail-catcher';
import { retryDelayMs, startOutbox, type Outbox } from '../../server/mail/outbox';
import { initAlarmModels, type AlarmModels } from '../../server/models/alarm-models';
import { freePort, quietLog, tempDb, waitFor, type TempDb } from './support/alarm-db';

let db: TempDb;
let m: AlarmModels;

beforeAll(async () => {
  db = await tempDb('jw-mail-');
  m = initAlarmModels(db.sequelize);
});
afterAll(async () => db.close());

const config = (port: number) => ({ smtpHost: null, smtpPort: port, smtpUser: null, smtpPass: null, smtpSecure: false, mailFrom: 'jacketwatch@localhost' });

describe('mail catcher', () => {
  let catcher: MailCatcher;
  beforeAll(async () => {
    catcher = await startMailCatcher({ port: 0, model: m.CaughtMail, log: quietLog });
  });
  afterAll(async () => catcher.stop());

  it('keeps a message sent over SMTP, parsed', async () => {
    const t = nodemailer.createTransport({ host: '127.0.0.1', port: catcher.port(), secure: false, ignoreTLS: true });
    await t.sendMail({ from: 'a@jacketwatch.test', to: 'tech@jacketwatch.test', subject: 'Hello °C', text: 'plain body', html: '<p>html body</p>' });
    const row = await m.CaughtMail.findOne({ where: { subject: 'Hello °C' } });
    expect(row).not.toBeNull();
    expect(row!.to).toBe('tech@jacketwatch.test');
    expect(row!.from).toBe('a@jacketwatch.test');
    expect(row!.text!.trim()).toBe('plain body');
    expect(row!.html).toContain('<p>html body</p>');
  });

  it('refuses a message above the size limit and keeps nothing of it', async () => {
    const t = nodemailer.createTransport({ host: '127.0.0.1', port: catcher.port(), secure: false, ignoreTLS: true });
    const before = await m.CaughtMail.count();
    await expect(t.sendMail({ from: 'a@x.test', to: 'b@x.test', subject: 'big', text: 'x'.repeat(MAX_MESSAGE_BYTES + 1000) })).rejects.toThrow();
    expect(await m.CaughtMail.count()).toBe(before);
  });

  it('does not offer AUTH or STARTTLS', async () => {
    const t = nodemailer.createTransport({ host: '127.0.0.1', port: catcher.port(), secure: false, requireTLS: true });
    await expect(t.sendMail({ from: 'a@x.test', to: 'b@x.test', subject: 'tls', text: 't' })).rejects.toThrow();
  });
});

describe('outbox', () => {
  it('backs off exponentially up to a maximum', () => {
    expect([1, 2, 3, 4, 10].map((a) => retryDelayMs(a, 1000, 6000))).toEqual([1000, 2000, 4000, 6000, 6000]);
  });

  it('delivers to the catcher, and keeps a message while the relay is down until it is back', async () => {
    const port = await freePort();
    const outbox: Outbox = startOutbox({ config: config(port), model: m.OutboxMessage, log: quietLog, retryBaseMs: 200, retryMaxMs: 800, pollMs: 100 });
    try {
      // relay down: nothing listens on the port
      const msg = await outbox.enqueue({ to: 'tech@jacketwatch.test', subject: 'while down', text: 'kept' });
      await waitFor(async () => ((await msg.reload()).attempts >= 2 ? true : null), 10000);
      expect(msg.sentAt).toBeNull();
      expect(msg.lastError).toBeTruthy();
      expect(await m.CaughtMail.count({ where: { subject: 'while down' } })).toBe(0);

      // relay back on the same port: the message arrives by itself
      const catcher = await startMailCatcher({ port, model: m.CaughtMail, log: quietLog });
      try {
        const caught = await waitFor(() => m.CaughtMail.findOne({ where: { subject: 'while down' } }), 10000);
        expect(caught.text!.trim()).toBe('kept');
        // the catcher keeps the message before the relay's answer reaches the outbox: wait for the outbox's record
        await waitFor(async () => ((await msg.reload()).sentAt ? msg : null), 10000);
        // the Message-ID given when queued is the one that arrives after the failed attempts
        expect(msg.messageId).toMatch(/^<[^@\s]+@localhost>$/);
        expect(caught.messageId).toBe(msg.messageId);
        expect(msg.sentAt).not.toBeNull();
        // sent once only
        await outbox.flush();
        expect(await m.CaughtMail.count({ where: { subject: 'while down' } })).toBe(1);
      } finally {
        await catcher.stop();
      }
    } finally {
      await outbox.stop();
    }
  });

  it('flush sends every due message, more than go at once, each once with its own Message-ID', async () => {
    const catcher = await startMailCatcher({ port: 0, model: m.CaughtMail, log: quietLog });
    const outbox = startOutbox({ config: config(catcher.port()), model: m.OutboxMessage, log: quietLog, pollMs: 60_000, parallel: 2 });
    try {
      const rows = [];
      for (let n = 0; n < 9; n++) rows.push(await outbox.enqueue({ to: 'planner@jacketwatch.test', subject: `batch ${n}`, text: `n ${n}` }));
      await outbox.flush();
      for (const r of rows) {
        await r.reload();
        expect(r.sentAt).not.toBeNull();
        const caught = await m.CaughtMail.findAll({ where: { subject: r.subject } });
        expect(caught.map((c) => c.messageId)).toEqual([r.messageId]);
      }
    } finally {
      await outbox.stop();
      await catcher.stop();
    }
  });

  it('a relay that goes silent on one message holds only that one; its retry keeps the same Message-ID', async () => {
    const catcher = await startMailCatcher({ port: 0, model: m.CaughtMail, log: quietLog });
    // A real TCP relay in front of the catcher. On the first connection carrying the "stalled one" message it
    // passes everything on (the catcher keeps the message) but never forwards the catcher's answers: the
    // sender hears nothing after DATA, like a relay that took the message and hung.
    let stalledOnce = false;
    let stallSeen = false;
    const sockets = new Set<net.Socket>();
    const relay = net.createServer((client) => {
      const upstream = net.connect(catcher.port(), '127.0.0.1');
      sockets.add(client).add(upstream);
      let seen = '';
      let silent = false;
      client.on('data', (d) => {
        seen += d.toString('latin1');
        if (!stalledOnce && seen.includes('Subject: stalled one')) {
          stalledOnce = true;
          silent = true;
          stallSeen = true;
        }
        upstream.write(d);
      });
      upstream.on('data', (d) => {
        if (!silent) client.write(d);
      });
      const end = () => {
        client.destroy();
        upstream.destroy();
      };
      client.on('close', end).on('error', end);
      upstream.on('close', end).on('error', end);
    });
    await new Promise<void>((resolve) => relay.listen(0, '127.0.0.1', resolve));
    const relayPort = (relay.address() as net.AddressInfo).port;
    const outbox = startOutbox({
      config: config(relayPort),
      model: m.OutboxMessage,
      log: quietLog,
      retryBaseMs: 200,
      retryMaxMs: 800,
      pollMs: 100,
      timeoutMs: 3000,
      parallel: 4,
    });
    try {
      const stalled = await outbox.enqueue({ to: 'tech@jacketwatch.test', subject: 'stalled one', text: 'held by the relay' });
      await waitFor(async () => stallSeen, 10000, 20);
      const others = [];
      for (const n of [1, 2, 3]) others.push(await outbox.enqueue({ to: 'tech@jacketwatch.test', subject: `goes on ${n}`, text: `body ${n}` }));

      // the others arrive while the stalled message is still waiting for its answer
      await waitFor(async () => ((await m.CaughtMail.count({ where: { subject: ['goes on 1', 'goes on 2', 'goes on 3'] } })) === 3 ? true : null), 10000, 20);
      await stalled.reload();
      expect(stalled.attempts).toBe(0);
      expect(stalled.sentAt).toBeNull();

      // after its timeout it is sent again, with the Message-ID it was given once
      await waitFor(async () => ((await stalled.reload()).sentAt ? true : null), 15000);
      expect(stalled.attempts).toBe(2);
      expect(stalled.lastError).toBeNull();
      const copies = await m.CaughtMail.findAll({ where: { subject: 'stalled one' } });
      expect(copies).toHaveLength(2); // the relay kept the first copy too: the same Message-ID lets it drop one
      expect(new Set(copies.map((c) => c.messageId))).toEqual(new Set([stalled.messageId]));
      for (const o of others) {
        await o.reload();
        const caught = await m.CaughtMail.findAll({ where: { subject: o.subject } });
        expect(caught).toHaveLength(1);
        expect(caught[0].messageId).toBe(o.messageId);
        expect(o.attempts).toBe(1);
      }
      expect(new Set([stalled, ...others].map((o) => o.messageId)).size).toBe(4);
    } finally {
      await outbox.stop();
      for (const s of sockets) s.destroy();
      await new Promise<void>((resolve) => relay.close(() => resolve()));
      await catcher.stop();
    }
  });

  it('two senders on one outbox (two servers): each message goes out once', async () => {
    const catcher = await startMailCatcher({ port: 0, model: m.CaughtMail, log: quietLog });
    const a = startOutbox({ config: config(catcher.port()), model: m.OutboxMessage, log: quietLog, pollMs: 60_000 });
    const b = startOutbox({ config: config(catcher.port()), model: m.OutboxMessage, log: quietLog, pollMs: 60_000 });
    try {
      const subjects = Array.from({ length: 12 }, (_, i) => `shared outbox ${i}`);
      // written directly, so that neither sender has started on them before both look
      await m.OutboxMessage.bulkCreate(subjects.map((subject) => ({ to: 'tech@jacketwatch.test', subject, text: 'once', nextAttemptAt: new Date() })));
      await Promise.all([a.flush(), b.flush(), a.flush(), b.flush()]);
      await waitFor(async () => ((await m.OutboxMessage.count({ where: { subject: subjects, sentAt: null } })) === 0 ? true : null), 10000);
      const caught = await m.CaughtMail.findAll({ where: { subject: subjects } });
      expect(caught.map((c) => c.subject).sort()).toEqual([...subjects].sort());
    } finally {
      await a.stop();
      await b.stop();
      await catcher.stop();
    }
  });
});

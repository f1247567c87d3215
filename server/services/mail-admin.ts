import type { Models } from '../models';

/** What the local mail catcher received, newest first (admin's mail page). */
export async function listCaughtMail(models: Models, limit: number) {
  const rows = await models.CaughtMail.findAll({
    order: [
      ['receivedAt', 'DESC'],
      ['id', 'DESC'],
    ],
    limit,
  });
  return rows.map((m) => ({ id: m.id, to: m.to, from: m.from, subject: m.subject, receivedAt: new Date(m.receivedAt).toISOString(), text: m.text }));
}

/** The outbox: what was sent or waits to be, newest first. */
export async function listOutbox(models: Models, limit: number) {
  const rows = await models.OutboxMessage.findAll({ order: [['id', 'DESC']], limit });
  return rows.map((m) => ({
    id: m.id,
    to: m.to,
    subject: m.subject,
    alarmId: m.alarmId,
    attempts: m.attempts,
    nextAttemptAt: new Date(m.nextAttemptAt).toISOString(),
    sentAt: m.sentAt ? new Date(m.sentAt).toISOString() : null,
    lastError: m.lastError,
    createdAt: new Date(m.createdAt).toISOString(),
  }));
}

import { Router } from 'express';
import { z } from 'zod';
import { requireAuth, requireRole } from '../auth/middleware';
import type { AppContext } from '../app-context';
import { parse } from './validate';

const listQuery = z.object({ limit: z.coerce.number().int().min(1).max(500).default(100) });

/** /api/admin/mail (what the local mail catcher received) and /api/admin/outbox (what was sent or waits). */
export function mailAdminRouter(ctx: AppContext): Router {
  const r = Router();
  r.use(['/admin/mail', '/admin/outbox'], requireAuth, requireRole('admin'));
  r.get('/admin/mail', async (req, res) => {
    const q = parse(listQuery, req.query);
    const rows = await ctx.models.CaughtMail.findAll({ order: [['receivedAt', 'DESC'], ['id', 'DESC']], limit: q.limit });
    res.json(rows.map((m) => ({ id: m.id, to: m.to, from: m.from, subject: m.subject, receivedAt: new Date(m.receivedAt).toISOString(), text: m.text })));
  });
  r.get('/admin/outbox', async (req, res) => {
    const q = parse(listQuery, req.query);
    const rows = await ctx.models.OutboxMessage.findAll({ order: [['id', 'DESC']], limit: q.limit });
    res.json(
      rows.map((m) => ({
        id: m.id,
        to: m.to,
        subject: m.subject,
        alarmId: m.alarmId,
        attempts: m.attempts,
        nextAttemptAt: new Date(m.nextAttemptAt).toISOString(),
        sentAt: m.sentAt ? new Date(m.sentAt).toISOString() : null,
        lastError: m.lastError,
        createdAt: new Date(m.createdAt).toISOString(),
      })),
    );
  });
  return r;
}

import { Router } from 'express';
import { z } from 'zod';
import { requireAuth, requireRole } from '../auth/middleware';
import type { AppContext } from '../app-context';
import { listCaughtMail, listOutbox } from '../services/mail-admin';
import { parse } from './validate';

const listQuery = z.object({ limit: z.coerce.number().int().min(1).max(500).default(100) });

/** /api/admin/mail (what the local mail catcher received) and /api/admin/outbox (what was sent or waits). */
export function mailAdminRouter(ctx: AppContext): Router {
  const r = Router();
  r.use(['/admin/mail', '/admin/outbox'], requireAuth, requireRole('admin'));
  r.get('/admin/mail', async (req, res) => {
    res.json(await listCaughtMail(ctx.models, parse(listQuery, req.query).limit));
  });
  r.get('/admin/outbox', async (req, res) => {
    res.json(await listOutbox(ctx.models, parse(listQuery, req.query).limit));
  });
  return r;
}

import { Router } from 'express';
import { z } from 'zod';
import { requireAuth, requireRole } from '../auth/middleware';
import type { AppContext } from '../app-context';
import { listCaughtMail, listOutbox } from '../services/mail-admin';
import { parse } from './validate';
import { route, type ApiDoc } from '../openapi/api-doc';
import { CaughtMail, OutboxMessage } from '../openapi/alarm-schemas';

const listQuery = z.object({ limit: z.coerce.number().int().min(1).max(500).default(100) });

/** /api/admin/mail (what the local mail catcher received) and /api/admin/outbox (what was sent or waits). */
export function mailAdminRouter(ctx: AppContext, doc: ApiDoc): Router {
  const r = Router();
  const tag = 'mail';
  r.use(['/admin/mail', '/admin/outbox'], requireAuth, requireRole('admin'));
  route(doc, {
    method: 'get',
    path: '/admin/mail',
    id: 'listCaughtMail',
    tag,
    summary: 'What the local mail catcher received, newest first',
    access: ['admin'],
    query: listQuery,
    ok: z.array(CaughtMail),
  });
  r.get('/admin/mail', async (req, res) => {
    res.json(await listCaughtMail(ctx.models, parse(listQuery, req.query).limit));
  });
  route(doc, {
    method: 'get',
    path: '/admin/outbox',
    id: 'listOutbox',
    tag,
    summary: 'The outbox: what was sent or waits to be, newest first',
    access: ['admin'],
    query: listQuery,
    ok: z.array(OutboxMessage),
  });
  r.get('/admin/outbox', async (req, res) => {
    res.json(await listOutbox(ctx.models, parse(listQuery, req.query).limit));
  });
  return r;
}

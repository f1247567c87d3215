import { Router } from 'express';
import { z } from 'zod';
import { requireAuth, requireRole } from '../auth/middleware';
import type { AppContext } from '../app-context';
import { createShift, deleteShift, listShifts, updateShift } from '../services/alarms/oncall';
import { instant, parse, parseId } from './validate';

const fields = {
  siteId: z.number().int().positive(),
  userId: z.number().int().positive(),
  backupUserId: z.number().int().positive().nullable(),
  startsAt: instant,
  endsAt: instant,
};
const createBody = z.strictObject({ ...fields, backupUserId: fields.backupUserId.default(null) });
const patchBody = z.strictObject(fields).partial();
const listQuery = z.object({ siteId: z.coerce.number().int().positive().optional(), from: instant.optional(), to: instant.optional() });

/** /api/oncall: the on-call rota. Everyone signed in reads; planners and admins change it. */
export function oncallRouter(ctx: AppContext): Router {
  const r = Router();
  r.use('/oncall', requireAuth);
  r.get('/oncall', async (req, res) => {
    res.json(await listShifts(ctx.models, parse(listQuery, req.query)));
  });
  r.post('/oncall', requireRole('planner', 'admin'), async (req, res) => {
    res.status(201).json(await createShift(ctx.models, parse(createBody, req.body)));
  });
  r.patch('/oncall/:id', requireRole('planner', 'admin'), async (req, res) => {
    const id = parseId(req.params);
    res.json(await updateShift(ctx.models, id, parse(patchBody, req.body)));
  });
  r.delete('/oncall/:id', requireRole('planner', 'admin'), async (req, res) => {
    await deleteShift(ctx.models, parseId(req.params));
    res.status(204).end();
  });
  return r;
}

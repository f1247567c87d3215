import { Router } from 'express';
import { z } from 'zod';
import { requireAuth, requireRole } from '../auth/middleware';
import type { AppContext } from '../app-context';
import { ROLES } from '../models/user';
import { createShift, deleteShift, listPeople, listShifts, updateShift } from '../services/alarms/oncall';
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
const peopleQuery = z.object({
  // one role or several, comma-separated: ?role=technician,planner
  role: z
    .string()
    .transform((v) => v.split(',').map((x) => x.trim()).filter(Boolean))
    .pipe(z.array(z.enum(ROLES)).min(1, 'name at least one role'))
    .optional(),
});
const listQuery = z.object({ siteId: z.coerce.number().int().positive().optional(), from: instant.optional(), to: instant.optional() });

/**
 * /api/oncall: the on-call rota. Everyone signed in reads; planners and admins change it.
 * /api/people: who can be put on the rota (id, name, e-mail, role), read-only, for planners and admins.
 */
export function oncallRouter(ctx: AppContext): Router {
  const r = Router();
  r.get('/people', requireAuth, requireRole('planner', 'admin'), async (req, res) => {
    res.json(await listPeople(ctx.models, parse(peopleQuery, req.query).role));
  });
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

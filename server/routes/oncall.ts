import { Router } from 'express';
import { z } from 'zod';
import { requireAuth, requireRole } from '../auth/middleware';
import type { AppContext } from '../app-context';
import { ROLES } from '../models/user';
import { createShift, deleteShift, listPeople, listShifts, updateShift } from '../services/alarms/oncall';
import { badRequest, notFound } from '../http-error';
import { maySeeSite, siteFilter, siteScopeOf, visibleUserIds } from '../services/site-access';
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
    .transform((v) =>
      v
        .split(',')
        .map((x) => x.trim())
        .filter(Boolean),
    )
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
    const roles = parse(peopleQuery, req.query).role;
    res.json(await listPeople(ctx.models, roles, await visibleUserIds(ctx.models, await siteScopeOf(req))));
  });
  // a user limited to some sites reads and plans only their rota; other sites' shifts read as unknown
  const assertShiftSite = async (req: Parameters<typeof siteScopeOf>[0], siteId: number | undefined, what: 'siteId' | 'shift') => {
    if (siteId === undefined || maySeeSite(await siteScopeOf(req), siteId)) return;
    if (what === 'shift') throw notFound('shift');
    throw badRequest('site does not exist or is retired', 'siteId');
  };
  const shiftSite = async (id: number) => (await ctx.models.OncallShift.findByPk(id, { attributes: ['id', 'siteId'] }))?.siteId;
  r.use('/oncall', requireAuth);
  r.get('/oncall', async (req, res) => {
    const q = parse(listQuery, req.query);
    const siteIds = siteFilter(await siteScopeOf(req), q.siteId);
    res.json(await listShifts(ctx.models, { ...q, siteIds }));
  });
  r.post('/oncall', requireRole('planner', 'admin'), async (req, res) => {
    const body = parse(createBody, req.body);
    await assertShiftSite(req, body.siteId, 'siteId');
    res.status(201).json(await createShift(ctx.models, body));
  });
  r.patch('/oncall/:id', requireRole('planner', 'admin'), async (req, res) => {
    const id = parseId(req.params);
    const body = parse(patchBody, req.body);
    await assertShiftSite(req, await shiftSite(id), 'shift');
    await assertShiftSite(req, body.siteId, 'siteId');
    res.json(await updateShift(ctx.models, id, body));
  });
  r.delete('/oncall/:id', requireRole('planner', 'admin'), async (req, res) => {
    const id = parseId(req.params);
    await assertShiftSite(req, await shiftSite(id), 'shift');
    await deleteShift(ctx.models, id);
    res.status(204).end();
  });
  return r;
}

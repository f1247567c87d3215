import { Router } from 'express';
import { z } from 'zod';
import { requireAuth, requireRole } from '../auth/middleware';
import type { AppContext } from '../app-context';
import { ROLES } from '../models/user';
import { createShift, deleteShift, listPeople, listShifts, updateShift } from '../services/alarms/oncall';
import { badRequest, notFound } from '../http-error';
import { maySeeSite, siteFilter, siteScopeOf, visibleUserIds } from '../services/site-access';
import { idParam, instant, parse, parseId } from './validate';
import { route, type ApiDoc } from '../openapi/api-doc';
import { Person, Shift, ShiftWithCoverage } from '../openapi/alarm-schemas';

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
export function oncallRouter(ctx: AppContext, doc: ApiDoc): Router {
  const r = Router();
  const tag = 'on-call';
  const planners = ['planner', 'admin'];
  route(doc, {
    method: 'get',
    path: '/people',
    id: 'listPeople',
    tag,
    summary: 'Who can be put on the rota (id, name, e-mail, role)',
    description: '`role`: one role or several, comma-separated.',
    access: planners,
    query: peopleQuery,
    ok: z.array(Person),
  });
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
  route(doc, { method: 'get', path: '/oncall', id: 'listShifts', tag, summary: 'The on-call rota', access: 'signed-in', query: listQuery, ok: z.array(Shift) });
  r.get('/oncall', async (req, res) => {
    const q = parse(listQuery, req.query);
    const siteIds = siteFilter(await siteScopeOf(req), q.siteId);
    res.json(await listShifts(ctx.models, { ...q, siteIds }));
  });
  route(doc, {
    method: 'post',
    path: '/oncall',
    id: 'createShift',
    tag,
    summary: 'Add a shift; the answer shows overlaps and gaps around it',
    access: planners,
    body: createBody,
    ok: ShiftWithCoverage,
    status: 201,
  });
  r.post('/oncall', requireRole('planner', 'admin'), async (req, res) => {
    const body = parse(createBody, req.body);
    await assertShiftSite(req, body.siteId, 'siteId');
    res.status(201).json(await createShift(ctx.models, body));
  });
  route(doc, {
    method: 'patch',
    path: '/oncall/:id',
    id: 'updateShift',
    tag,
    summary: 'Change a shift',
    access: planners,
    params: idParam,
    body: patchBody,
    ok: ShiftWithCoverage,
  });
  r.patch('/oncall/:id', requireRole('planner', 'admin'), async (req, res) => {
    const id = parseId(req.params);
    const body = parse(patchBody, req.body);
    await assertShiftSite(req, await shiftSite(id), 'shift');
    await assertShiftSite(req, body.siteId, 'siteId');
    res.json(await updateShift(ctx.models, id, body));
  });
  route(doc, {
    method: 'delete',
    path: '/oncall/:id',
    id: 'deleteShift',
    tag,
    summary: 'Remove a shift',
    access: planners,
    params: idParam,
    ok: z.null(),
    status: 204,
  });
  r.delete('/oncall/:id', requireRole('planner', 'admin'), async (req, res) => {
    const id = parseId(req.params);
    await assertShiftSite(req, await shiftSite(id), 'shift');
    await deleteShift(ctx.models, id);
    res.status(204).end();
  });
  return r;
}

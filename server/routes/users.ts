import { Router } from 'express';
import { z } from 'zod';
import { requireAuth, requireRole } from '../auth/middleware';
import type { AppContext } from '../app-context';
import { passwordProblem } from '../../shared/password-rules';
import { ROLES } from '../models/user';
import { createUser, disableUser, listUsers, setSitesOfUser, updateUser, userView, userViews } from '../services/users';
import { idParam, parse, parseId } from './validate';
import { route, type ApiDoc } from '../openapi/api-doc';
import { User } from '../openapi/core-schemas';

const userFields = {
  email: z.email().max(254),
  name: z.string().trim().min(1).max(120),
  password: z.string().superRefine((p, c) => {
    const problem = passwordProblem(p);
    if (problem) c.addIssue({ code: 'custom', message: problem });
  }),
  role: z.enum(ROLES),
};
const createBody = z.strictObject(userFields).superRefine((u, c) => {
  const problem = passwordProblem(u.password, u.email);
  if (problem) c.addIssue({ code: 'custom', message: problem, path: ['password'] });
});
const patchBody = z.strictObject({ ...userFields, disabled: z.boolean() }).partial();
const sitesBody = z.strictObject({ siteIds: z.array(z.number().int().positive()).max(1000) });

export function usersRouter(ctx: AppContext, doc: ApiDoc): Router {
  const r = Router();
  const tag = 'users';
  const access = ['admin'];
  r.use('/users', requireAuth, requireRole('admin'));
  route(doc, { method: 'get', path: '/users', id: 'listUsers', tag, summary: 'Users', access, ok: z.array(User) });
  r.get('/users', async (_req, res) => {
    res.json(await userViews(ctx.models, await listUsers(ctx.models)));
  });
  route(doc, {
    method: 'post',
    path: '/users',
    id: 'createUser',
    tag,
    summary: 'Create a user',
    access,
    body: createBody,
    ok: User,
    status: 201,
    errors: [409],
  });
  r.post('/users', async (req, res) => {
    res.status(201).json(await userView(ctx.models, await createUser(ctx.models, parse(createBody, req.body))));
  });
  route(doc, {
    method: 'patch',
    path: '/users/:id',
    id: 'updateUser',
    tag,
    summary: 'Change a user',
    access,
    params: idParam,
    body: patchBody,
    ok: User,
    errors: [409],
  });
  r.patch('/users/:id', async (req, res) => {
    const id = parseId(req.params);
    res.json(await userView(ctx.models, await updateUser(ctx.models, req.user!.id, id, parse(patchBody, req.body), ctx.access)));
  });
  route(doc, {
    method: 'put',
    path: '/users/:id/sites',
    id: 'setUserSites',
    tag,
    summary: 'Limit a user to some sites',
    description:
      'Replaces the list. A user with sites sees only their engines, readings, alarms, work orders, attachments, coolant tests and due-list items; anything of another site answers 404. Empty list: every site. Admins see every site whatever the list.',
    access,
    params: idParam,
    body: sitesBody,
    ok: User,
  });
  r.put('/users/:id/sites', async (req, res) => {
    const id = parseId(req.params);
    res.json(await setSitesOfUser(ctx.models, id, parse(sitesBody, req.body).siteIds, ctx.access));
  });
  route(doc, { method: 'delete', path: '/users/:id', id: 'disableUser', tag, summary: 'Disable a user', access, params: idParam, ok: User });
  r.delete('/users/:id', async (req, res) => {
    res.json(await userView(ctx.models, await disableUser(ctx.models, req.user!.id, parseId(req.params), ctx.access)));
  });
  return r;
}

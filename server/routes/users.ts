import { Router } from 'express';
import { z } from 'zod';
import { requireAuth, requireRole } from '../auth/middleware';
import type { AppContext } from '../app-context';
import { passwordProblem } from '../../shared/password-rules';
import { ROLES } from '../models/user';
import { createUser, disableUser, listUsers, setSitesOfUser, updateUser, userView, userViews } from '../services/users';
import { parse, parseId } from './validate';

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

export function usersRouter(ctx: AppContext): Router {
  const r = Router();
  r.use('/users', requireAuth, requireRole('admin'));
  r.get('/users', async (_req, res) => {
    res.json(await userViews(ctx.models, await listUsers(ctx.models)));
  });
  r.post('/users', async (req, res) => {
    res.status(201).json(await userView(ctx.models, await createUser(ctx.models, parse(createBody, req.body))));
  });
  r.patch('/users/:id', async (req, res) => {
    const id = parseId(req.params);
    res.json(await userView(ctx.models, await updateUser(ctx.models, req.user!.id, id, parse(patchBody, req.body), ctx.access)));
  });
  r.put('/users/:id/sites', async (req, res) => {
    const id = parseId(req.params);
    res.json(await setSitesOfUser(ctx.models, id, parse(sitesBody, req.body).siteIds, ctx.access));
  });
  r.delete('/users/:id', async (req, res) => {
    res.json(await userView(ctx.models, await disableUser(ctx.models, req.user!.id, parseId(req.params), ctx.access)));
  });
  return r;
}

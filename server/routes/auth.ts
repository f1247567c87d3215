import { Router } from 'express';
import { z } from 'zod';
import { createLoginLimiter } from '../auth/login-limit';
import { requireAuth } from '../auth/middleware';
import type { AppContext } from '../app-context';
import { login, me } from '../services/auth';
import { parse } from './validate';

const loginBody = z.object({ email: z.string().trim().min(1).max(254), password: z.string().min(1).max(200) });

export function authRouter(ctx: AppContext): Router {
  const r = Router();
  r.post('/auth/login', createLoginLimiter(), async (req, res) => {
    const body = parse(loginBody, req.body);
    res.json(await login(ctx.models, ctx.tokens, body.email, body.password));
  });
  r.get('/auth/me', requireAuth, async (req, res) => {
    res.json(await me(ctx.models, req.user!.id));
  });
  return r;
}

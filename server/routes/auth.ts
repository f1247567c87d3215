import { Router, type Request, type Response } from 'express';
import { z } from 'zod';
import { PASSWORD_MAX_BYTES } from '../../shared/password-rules';
import { createLoginLimiter } from '../auth/login-limit';
import { requireAuth } from '../auth/middleware';
import type { AppContext } from '../app-context';
import { login, me } from '../services/auth';
import { parse } from './validate';

// over 72 bytes bcrypt would ignore the tail: refused rather than silently truncated
const loginBody = z.object({
  email: z.string().trim().min(1).max(254),
  password: z.string().min(1).refine((p) => Buffer.byteLength(p, 'utf8') <= PASSWORD_MAX_BYTES, `at most ${PASSWORD_MAX_BYTES} bytes`),
});

export function authRouter(ctx: AppContext): Router {
  const r = Router();
  r.post('/auth/login', ...createLoginLimiter(), async (req: Request, res: Response) => {
    const body = parse(loginBody, req.body);
    res.json(await login(ctx.models, ctx.tokens, body.email, body.password, req.ip ?? ''));
  });
  r.get('/auth/me', requireAuth, async (req, res) => {
    res.json(await me(ctx.models, req.user!.id));
  });
  return r;
}

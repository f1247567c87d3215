import { Router, type Request, type Response } from 'express';
import { z } from 'zod';
import { PASSWORD_MAX_BYTES } from '../../shared/password-rules';
import { createLoginLimiter } from '../auth/login-limit';
import { requireAuth } from '../auth/middleware';
import { clearSessionCookie, crossSiteRefusal, setSessionCookie } from '../auth/session-cookie';
import type { AppContext } from '../app-context';
import { HttpError } from '../http-error';
import { login, me } from '../services/auth';
import { parse } from './validate';

// over 72 bytes bcrypt would ignore the tail: refused rather than silently truncated
const loginBody = z.object({
  email: z.string().trim().min(1).max(254),
  password: z
    .string()
    .min(1)
    .refine((p) => Buffer.byteLength(p, 'utf8') <= PASSWORD_MAX_BYTES, `at most ${PASSWORD_MAX_BYTES} bytes`),
  /**
   * `cookie`: the browser app's sign-in. The token is set as an httpOnly cookie and not put in the
   * answer, so page script never sees it. `token` (default): API clients get the bearer token.
   */
  session: z.enum(['cookie', 'token']).optional(),
});

export function authRouter(ctx: AppContext): Router {
  const r = Router();
  r.post('/auth/login', ...createLoginLimiter(), async (req: Request, res: Response) => {
    const body = parse(loginBody, req.body);
    if (body.session === 'cookie') {
      // a page of another site must not sign the browser in to an account of its choosing
      const refusal = crossSiteRefusal(req.method, req.headers, req.host, { needHeader: true });
      if (refusal) throw new HttpError(403, refusal);
    }
    const result = await login(ctx.models, ctx.tokens, body.email, body.password, req.ip ?? '');
    if (body.session === 'cookie') {
      setSessionCookie(req, res, result.token, ctx.tokens.lifetimeS);
      res.json({ user: result.user });
      return;
    }
    res.json(result);
  });
  // Sign-out clears the browser's cookie (a bearer token simply stops being sent by its client).
  r.post('/auth/logout', (req: Request, res: Response) => {
    clearSessionCookie(req, res);
    res.json({ signedOut: true });
  });
  r.get('/auth/me', requireAuth, async (req, res) => {
    res.json(await me(ctx.models, req.user!.id));
  });
  return r;
}

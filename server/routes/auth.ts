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
import { route, type ApiDoc } from '../openapi/api-doc';
import { LoginAnswer, SessionUser } from '../openapi/core-schemas';

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

export function authRouter(ctx: AppContext, doc: ApiDoc): Router {
  const r = Router();
  const tag = 'auth';
  route(doc, {
    method: 'post',
    path: '/auth/login',
    id: 'signIn',
    tag,
    summary: 'Sign in',
    description:
      '`session: "cookie"` (the browser app, with the x-jw-request header): the token is set as an httpOnly SameSite=Strict cookie and left out of the answer; otherwise the answer carries the bearer token. 403: a cookie sign-in from another site; 429: too many sign-ins waiting.',
    access: 'public',
    body: loginBody,
    ok: LoginAnswer,
    errors: [401, 403, 429],
  });
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
  route(doc, {
    method: 'post',
    path: '/auth/logout',
    id: 'signOut',
    tag,
    summary: 'Sign out: clears the session cookie',
    access: 'public',
    ok: z.object({ signedOut: z.literal(true) }),
  });
  r.post('/auth/logout', (req: Request, res: Response) => {
    clearSessionCookie(req, res);
    res.json({ signedOut: true });
  });
  route(doc, { method: 'get', path: '/auth/me', id: 'getCurrentUser', tag, summary: 'The signed-in user', access: 'signed-in', ok: SessionUser });
  r.get('/auth/me', requireAuth, async (req, res) => {
    res.json(await me(ctx.models, req.user!.id));
  });
  return r;
}

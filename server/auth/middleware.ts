import type { NextFunction, Request, Response } from 'express';
import { HttpError } from '../http-error';
import type { Role } from '../models/user';
import type { AuthUser } from '../telemetry/types';
import type { AppContext } from '../app-context';
import { crossSiteRefusal, sessionCookieToken } from './session-cookie';

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    interface Request {
      /** Set by requireAuth. */
      user?: AuthUser;
    }
  }
}

function bearer(req: Request): string | null {
  const h = req.get('authorization');
  const m = h ? /^Bearer\s+(\S+)$/i.exec(h) : null;
  return m ? m[1] : null;
}

/**
 * The request's token: `Authorization: Bearer` (API clients, tests), else the browser's session cookie.
 * A request that uses the cookie is checked for cross-site use first (403).
 */
export function requestToken(req: Request): string | null {
  const fromHeader = bearer(req);
  if (fromHeader) return fromHeader;
  const fromCookie = sessionCookieToken(req.get('cookie'));
  if (!fromCookie) return null;
  const refusal = crossSiteRefusal(req.method, req.headers, req.host, { needHeader: true });
  if (refusal) throw new HttpError(403, refusal);
  return fromCookie;
}

/** 401 unless the request carries a valid token of an enabled user; sets req.user. Works in any router of the app. */
export async function requireAuth(req: Request, _res: Response, next: NextFunction): Promise<void> {
  const ctx = req.app.locals.ctx as AppContext;
  const claims = ctx.tokens.verify(requestToken(req));
  if (!claims) throw new HttpError(401, 'sign-in required');
  // a disabled or deleted user loses access at once, not when the token expires; so does a token
  // signed before the user's role, sites or password changed (session version)
  const user = await ctx.models.User.findByPk(claims.id, { attributes: ['id', 'email', 'role', 'disabled', 'sessionVersion'] });
  if (!user || user.disabled) throw new HttpError(401, 'account is not active');
  if ((claims.sv ?? 0) !== user.sessionVersion) throw new HttpError(401, 'session ended; sign in again');
  req.user = { id: user.id, email: user.email, role: user.role, sv: user.sessionVersion };
  next();
}

/** 403 unless req.user has one of the roles (use after requireAuth). */
export function requireRole(...roles: Role[]) {
  return (req: Request, _res: Response, next: NextFunction): void => {
    if (!req.user) throw new HttpError(401, 'sign-in required');
    if (!roles.includes(req.user.role)) throw new HttpError(403, `needs role ${roles.join(' or ')}`);
    next();
  };
}

/** For the socket.io handshake: the same checks as requireAuth, on a verified token's claims. */
export async function sessionStillValid(models: AppContext['models'], claims: AuthUser): Promise<boolean> {
  const user = await models.User.findByPk(claims.id, { attributes: ['id', 'disabled', 'sessionVersion', 'role'] });
  return !!user && !user.disabled && user.role === claims.role && (claims.sv ?? 0) === user.sessionVersion;
}

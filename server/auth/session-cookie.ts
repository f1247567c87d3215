import type { IncomingHttpHeaders } from 'node:http';
import type { Request, Response } from 'express';

/**
 * The browser's session: the signed token in an httpOnly cookie (page script cannot read it),
 * SameSite=Strict (a cross-site page's requests do not carry it), Secure when the request came
 * over TLS (req.secure: directly, or from a TLS proxy named by TRUST_PROXY via X-Forwarded-Proto).
 * Over TLS the name has the `__Host-` prefix, so the browser also refuses it without Secure, with a
 * Domain or with a path other than `/`.
 *
 * Cross-site requests: besides SameSite, a state-changing request that signs in with the cookie must
 * carry the header CSRF_HEADER (a page of another site cannot add a custom header without a CORS
 * preflight, which this server never grants) and must not be marked cross-site by the browser
 * (Sec-Fetch-Site, or an Origin of another host when the browser sends no Sec-Fetch-Site).
 * API clients with `Authorization: Bearer` are not affected: a browser never adds that header by itself.
 */
export const SESSION_COOKIE = 'jw_session';
export const SECURE_SESSION_COOKIE = '__Host-jw_session';
export const CSRF_HEADER = 'x-jw-request';

/** One cookie's value from a Cookie header (RFC 6265 syntax; the value is not decoded: tokens are plain base64url). */
export function readCookie(header: string | undefined, name: string): string | null {
  if (!header) return null;
  for (const part of header.split(';')) {
    const eq = part.indexOf('=');
    if (eq < 0) continue;
    if (part.slice(0, eq).trim() !== name) continue;
    let value = part.slice(eq + 1).trim();
    if (value.startsWith('"') && value.endsWith('"')) value = value.slice(1, -1);
    return value || null;
  }
  return null;
}

/** The session token of a request's cookies, if any (the TLS name first). */
export function sessionCookieToken(cookieHeader: string | undefined): string | null {
  return readCookie(cookieHeader, SECURE_SESSION_COOKIE) ?? readCookie(cookieHeader, SESSION_COOKIE);
}

export function setSessionCookie(req: Request, res: Response, token: string, maxAgeS: number): void {
  res.cookie(req.secure ? SECURE_SESSION_COOKIE : SESSION_COOKIE, token, {
    httpOnly: true,
    sameSite: 'strict',
    secure: req.secure,
    path: '/',
    maxAge: maxAgeS * 1000,
  });
}

/** Sign-out: both names are cleared, so a session set over TLS and one set without are both gone. */
export function clearSessionCookie(req: Request, res: Response): void {
  res.clearCookie(SECURE_SESSION_COOKIE, { httpOnly: true, sameSite: 'strict', secure: true, path: '/' });
  res.clearCookie(SESSION_COOKIE, { httpOnly: true, sameSite: 'strict', secure: req.secure, path: '/' });
}

const SAFE_METHODS = new Set(['GET', 'HEAD', 'OPTIONS']);

/**
 * Why a request made with the session cookie is refused as possibly cross-site, or null when it is
 * fine. `host` is the address the browser used (the Host header, or X-Forwarded-Host behind a trusted proxy).
 */
export function crossSiteRefusal(method: string, headers: IncomingHttpHeaders, host: string | undefined, opts: { needHeader: boolean }): string | null {
  const site = headers['sec-fetch-site'];
  if (typeof site === 'string' && site !== 'same-origin' && site !== 'none') return `a ${site} request may not use the session cookie`;
  if (typeof site !== 'string') {
    const origin = headers.origin;
    if (typeof origin === 'string' && origin !== 'null') {
      let originHost: string | null = null;
      try {
        originHost = new URL(origin).host;
      } catch {
        /* malformed: refused below */
      }
      if (!originHost || !host || originHost.toLowerCase() !== host.toLowerCase()) return 'a request from another origin may not use the session cookie';
    } else if (origin === 'null') {
      return 'a request from an opaque origin may not use the session cookie';
    }
  }
  if (opts.needHeader && !SAFE_METHODS.has(method.toUpperCase()) && headers[CSRF_HEADER] === undefined) {
    return `a change made with the session cookie needs the ${CSRF_HEADER} header`;
  }
  return null;
}

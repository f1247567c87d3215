import type { Request, RequestHandler } from 'express';
import { ipKeyGenerator, rateLimit } from 'express-rate-limit';

const emailOf = (req: Request): string => (typeof req.body?.email === 'string' ? req.body.email.trim().toLowerCase().slice(0, 254) : '');

/** Limits of failed sign-ins per 15 minutes; successful ones are not counted, so many sessions stay possible. */
export const LOGIN_LIMITS = {
  /** one address and one e-mail: a person mistyping */
  addressAndAccount: 10,
  /** one address over any e-mails: password spraying */
  address: 30,
  /** one e-mail from any addresses: guessing one account from many addresses */
  account: 20,
};

function failureLimiter(limit: number, key: (req: Request) => string, windowMs: number): RequestHandler {
  return rateLimit({
    windowMs,
    limit,
    skipSuccessfulRequests: true,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    // counted as each request arrives, so a burst is cut before it reaches password hashing
    keyGenerator: key,
    handler: (_req, res) => {
      res.status(429).json({ error: 'too many failed sign-in attempts; try again later' });
    },
  });
}

/**
 * Failed sign-ins per address and e-mail, per address, and per e-mail. `req.ip` follows Express's
 * 'trust proxy' (the TRUST_PROXY setting): without it X-Forwarded-For is ignored.
 */
export function createLoginLimiter(opts: { windowMs?: number; limit?: number } = {}): RequestHandler[] {
  const windowMs = opts.windowMs ?? 15 * 60 * 1000;
  const ip = (req: Request) => ipKeyGenerator(req.ip ?? '');
  return [
    failureLimiter(opts.limit ?? LOGIN_LIMITS.addressAndAccount, (req) => `${ip(req)}|${emailOf(req)}`, windowMs),
    failureLimiter(LOGIN_LIMITS.address, ip, windowMs),
    failureLimiter(LOGIN_LIMITS.account, emailOf, windowMs),
  ];
}

import type { Request } from 'express';
import { ipKeyGenerator, rateLimit } from 'express-rate-limit';

/** Failed sign-ins per client address and e-mail; successful ones are not counted, so many sessions stay possible. */
export function createLoginLimiter(opts: { windowMs?: number; limit?: number } = {}) {
  return rateLimit({
    windowMs: opts.windowMs ?? 15 * 60 * 1000,
    limit: opts.limit ?? 10,
    skipSuccessfulRequests: true,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    keyGenerator: (req: Request) => {
      const email = typeof req.body?.email === 'string' ? req.body.email.trim().toLowerCase() : '';
      return `${ipKeyGenerator(req.ip ?? '')}|${email}`;
    },
    handler: (_req, res) => {
      res.status(429).json({ error: 'too many failed sign-in attempts; try again later' });
    },
  });
}

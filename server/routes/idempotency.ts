import type { NextFunction, Request, Response } from 'express';
import { z } from 'zod';
import type { AppContext } from '../app-context';
import { HttpError } from '../http-error';
import { IdempotencyService } from '../services/idempotency';

const KEY = /^[A-Za-z0-9_:.-]{8,100}$/;
/** The header as the OpenAPI document shows it on the write routes this middleware guards. */
export const idempotencyHeaders = z.object({
  'idempotency-key': z
    .string()
    .regex(KEY)
    .optional()
    .describe(
      'the same key again answers the first answer (Idempotent-Replayed: true) without doing it twice; 422 on another request, 409 while the first is handled',
    ),
});
/** Answers not kept for a replay: the session or the rate limit may be different next time. */
const NOT_KEPT = new Set([401, 408, 429]);

/**
 * Honours an `Idempotency-Key` header on write requests (after requireAuth): the first answer is kept
 * before it is sent, and a retry with the same key gets it again (`Idempotent-Replayed: true`) without
 * doing the change twice. Without the header a request is handled as before.
 */
export function idempotent(ctx: AppContext) {
  const svc = new IdempotencyService(ctx.models);
  return async (req: Request, res: Response, next: NextFunction): Promise<void> => {
    const key = req.get('idempotency-key');
    if (key === undefined || req.method === 'GET' || req.method === 'HEAD' || !req.user) return next();
    if (!KEY.test(key)) throw new HttpError(400, 'Idempotency-Key must be 8-100 characters of A-Z a-z 0-9 _ : . -', 'Idempotency-Key');
    const userId = req.user.id;
    const path = req.originalUrl.slice(0, 300);
    const start = await svc.start(userId, key, req.method, path);
    if (start.kind === 'mismatch') throw new HttpError(422, 'this Idempotency-Key was used for another request', 'Idempotency-Key');
    if (start.kind === 'busy') {
      // not a conflict with the data: the first request is still running (Retry-After tells the client to try again)
      res.setHeader('Retry-After', '2');
      throw new HttpError(409, 'a request with this Idempotency-Key is still being handled; try again');
    }
    if (start.kind === 'replay') {
      res.setHeader('Idempotent-Replayed', 'true');
      res.status(start.statusCode).json(start.body);
      return;
    }
    let kept = false;
    const json = res.json.bind(res);
    res.json = (body: unknown) => {
      const code = res.statusCode;
      kept = true;
      const save = code < 500 && !NOT_KEPT.has(code) ? svc.finish(userId, key, code, body) : svc.forget(userId, key);
      void save.then(
        () => json(body),
        (err: unknown) => {
          ctx.log.error('idempotency key not saved', { key, err: String(err) });
          json(body);
        },
      );
      return res;
    };
    res.on('close', () => {
      if (!kept) void svc.forget(userId, key).catch(() => undefined);
    });
    next();
  };
}

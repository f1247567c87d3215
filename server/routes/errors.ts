import type { ErrorRequestHandler, RequestHandler } from 'express';
import { UniqueConstraintError, ValidationError } from 'sequelize';
import { HttpError } from '../http-error';
import type { Logger } from '../logger';

export const apiNotFound: RequestHandler = (req, res) => {
  res.status(404).json({ error: `no such API route: ${req.method} ${req.originalUrl.split('?')[0]}` });
};

/** Every error leaves as `{ error, field? }` JSON; unexpected ones are logged and hidden. */
export function apiErrors(log: Logger): ErrorRequestHandler {
  return (err, req, res, next) => {
    // an answer already on its way (a stream failed midway): Express closes the connection
    if (res.headersSent) return next(err);
    if (err instanceof HttpError) {
      res.status(err.status).json(err.field ? { error: err.message, field: err.field } : { error: err.message });
      return;
    }
    // body-parser errors carry a status and a type
    if (err?.type === 'entity.parse.failed') return void res.status(400).json({ error: 'body is not valid JSON' });
    if (err?.type === 'entity.too.large') return void res.status(413).json({ error: 'body is too large' });
    if (typeof err?.status === 'number' && err.status >= 400 && err.status < 500) return void res.status(err.status).json({ error: String(err.message) });
    if (err instanceof UniqueConstraintError) {
      const field = err.errors[0]?.path ?? undefined;
      return void res.status(409).json({ error: 'already exists', field });
    }
    if (err instanceof ValidationError) {
      return void res.status(400).json({ error: err.errors[0]?.message ?? 'invalid', field: err.errors[0]?.path ?? undefined });
    }
    log.error(`${req.method} ${req.originalUrl} failed`, err);
    res.status(500).json({ error: 'internal error' });
  };
}

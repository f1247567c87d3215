import fs from 'node:fs';
import path from 'node:path';
import express, { type Express, type Router } from 'express';
import type { AppContext } from './app-context';
import { apiErrors, apiNotFound } from './routes/errors';
import { coreRouters } from './routes';

export const BROWSER_DIST = path.resolve(__dirname, '..', 'dist', 'jacketwatch', 'browser');

export interface AppOptions {
  /** Routers of later features, mounted at /api after the core ones. */
  extraRouters?: Router[];
  /** Folder of the built Angular app; served with SPA fallback when it exists. */
  staticDir?: string;
}

export function createApp(ctx: AppContext, opts: AppOptions = {}): Express {
  const app = express();
  app.locals.ctx = ctx;
  app.disable('x-powered-by');
  // X-Forwarded-For counts only behind a proxy the operator named (TRUST_PROXY); else any client could pick its own address
  app.set('trust proxy', ctx.config.trustProxy ?? false);

  const api = express.Router();
  api.use(express.json({ limit: '256kb' }));
  for (const r of [...coreRouters(ctx), ...(opts.extraRouters ?? [])]) api.use(r);
  api.use(apiNotFound);
  api.use(apiErrors(ctx.log));
  app.use('/api', api);

  const dir = opts.staticDir ?? BROWSER_DIST;
  if (fs.existsSync(path.join(dir, 'index.html'))) {
    app.use(express.static(dir, { index: 'index.html', maxAge: '1h' }));
    // deep links of the single-page app; /api/* never reaches here (404 JSON above)
    app.get('/{*splat}', (_req, res) => {
      res.sendFile(path.join(dir, 'index.html'));
    });
  }
  return app;
}

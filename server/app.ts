import fs from 'node:fs';
import path from 'node:path';
import { randomUUID } from 'node:crypto';
import express, { type Express, type Request, type Response, type Router } from 'express';
import pino from 'pino';
import { pinoHttp } from 'pino-http';
import type { AppContext } from './app-context';
import { apiErrors, apiNotFound } from './routes/errors';
import { coreRouters } from './routes';
import { newApiDoc, type ApiDoc } from './openapi/api-doc';
import { HASHED_ASSET, securityHeaders } from './security-headers';

/** Files of the build that name the current version: the HTTP cache must always ask again. */
const NEVER_CACHED = new Set(['index.html', 'ngsw.json', 'ngsw-worker.js', 'safety-worker.js', 'worker-basic.min.js', 'manifest.webmanifest']);

export const BROWSER_DIST = path.resolve(__dirname, '..', 'dist', 'jacketwatch', 'browser');

export interface AppOptions {
  /** Routers of later features, mounted at /api after the core ones; each registers its routes in the app's OpenAPI document. */
  extraRouters?: (doc: ApiDoc) => Router[];
  /** Folder of the built Angular app; served with SPA fallback when it exists. */
  staticDir?: string;
}

/**
 * One JSON line per API request: method, path, status, duration (responseTime, ms), a request id (echoed
 * in X-Request-Id) and the signed-in user's id. Bodies, headers and the query string (it may hold a
 * token) are left out. 5xx at error, 4xx at warn, the rest at info.
 */
function requestLog(ctx: AppContext) {
  return pinoHttp<Request, Response, string>({
    logger: (ctx.log.pino ?? pino({ level: 'silent' })) as pino.Logger<string>,
    genReqId: (req, res) => {
      const id = randomUUID();
      res.setHeader('X-Request-Id', id);
      return id;
    },
    // on the finished line only: pino-http asks customProps at the start too (no user yet), which wrote "userId" twice
    customSuccessObject: (req, _res, line: object) => ({ ...line, userId: req.user?.id ?? null }),
    customErrorObject: (req, _res, _err, line: object) => ({ ...line, userId: req.user?.id ?? null }),
    customLogLevel: (_req, res, err) => (err || res.statusCode >= 500 ? 'error' : res.statusCode >= 400 ? 'warn' : 'info'),
    serializers: {
      req: (req: { id: unknown; method: string; url: string }) => ({ id: req.id, method: req.method, path: req.url.split('?')[0] }),
      res: (res: { statusCode: number }) => ({ statusCode: res.statusCode }),
    },
  });
}

export function createApp(ctx: AppContext, opts: AppOptions = {}): Express {
  const app = express();
  app.locals.ctx = ctx;
  app.disable('x-powered-by');
  // X-Forwarded-For counts only behind a proxy the operator named (TRUST_PROXY); else any client could pick its own address
  app.set('trust proxy', ctx.config.trustProxy ?? false);
  app.use(securityHeaders());

  const api = express.Router();
  api.use(requestLog(ctx));
  api.use(express.json({ limit: '256kb' }));
  // one OpenAPI document per app: every router registers its routes in it (served at /api/openapi.json)
  const doc = newApiDoc();
  for (const r of [...coreRouters(ctx, doc), ...(opts.extraRouters?.(doc) ?? [])]) api.use(r);
  api.use(apiNotFound);
  api.use(apiErrors(ctx.log));
  app.use('/api', api);

  const dir = opts.staticDir ?? BROWSER_DIST;
  if (fs.existsSync(path.join(dir, 'index.html'))) {
    // index.html is never cached (it names the current chunks), nor are the service worker and its
    // manifest of files (a cached one would hold users on an old app); hashed files never change
    app.use(
      express.static(dir, {
        index: 'index.html',
        setHeaders: (res, file) => {
          if (NEVER_CACHED.has(path.basename(file))) res.setHeader('Cache-Control', 'no-cache');
          else if (HASHED_ASSET.test(file)) res.setHeader('Cache-Control', 'public, max-age=31536000, immutable');
          else res.setHeader('Cache-Control', 'public, max-age=3600');
        },
      }),
    );
    // deep links of the single-page app; /api/* never reaches here (404 JSON above). A path naming a
    // file (an extension) that is not there is a 404: a stale chunk must not be answered with HTML.
    app.get('/{*splat}', (req, res) => {
      if (path.extname(req.path)) {
        res.status(404).type('text/plain').send('not found');
        return;
      }
      res.setHeader('Cache-Control', 'no-cache');
      res.sendFile(path.join(dir, 'index.html'));
    });
  }
  return app;
}

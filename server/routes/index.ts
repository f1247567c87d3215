import { Router } from 'express';
import type { AppContext } from '../app-context';
import { buildApiDocument, route, type ApiDoc } from '../openapi/api-doc';
import { OpenApiDocument } from '../openapi/core-schemas';
import type { AlarmFeature } from '../services/alarms';
import { alarmsRouter } from './alarms';
import { authRouter } from './auth';
import { calcRouter } from './calc';
import { coolantRouter } from './coolant';
import { devicesRouter } from './devices';
import { engineHistoryRouter } from './engine-history';
import { enginesRouter } from './engines';
import { healthRouter } from './health';
import { mailAdminRouter } from './mail-admin';
import { oncallRouter } from './oncall';
import { rulesRouter } from './rules';
import { sitesRouter } from './sites';
import { usersRouter } from './users';
import { workOrdersRouter } from './work-orders';

/** GET /api/openapi.json: the document of everything registered in `doc` (built once, on the first ask). */
function docsRouter(doc: ApiDoc): Router {
  const r = Router();
  let built: ReturnType<typeof buildApiDocument> | null = null;
  route(doc, {
    method: 'get',
    path: '/openapi.json',
    id: 'getOpenApiDocument',
    tag: 'health',
    summary: 'This document (OpenAPI 3.1)',
    access: 'public',
    ok: OpenApiDocument,
  });
  r.get('/openapi.json', (_req, res) => {
    res.json((built ??= buildApiDocument(doc)));
  });
  return r;
}

/** Every core router, to be mounted at /api; each registers its routes in `doc`. Later features add theirs in createApp's `extraRouters`. */
export function coreRouters(ctx: AppContext, doc: ApiDoc): Router[] {
  return [
    docsRouter(doc),
    healthRouter(ctx, doc),
    authRouter(ctx, doc),
    sitesRouter(ctx, doc),
    enginesRouter(ctx, doc),
    devicesRouter(ctx, doc),
    usersRouter(ctx, doc),
    workOrdersRouter(ctx, doc),
    calcRouter(ctx, doc),
    coolantRouter(ctx, doc),
    engineHistoryRouter(ctx, doc),
  ];
}

/** The alarm feature's routers (alarms, on-call, rules, mail), mounted by startServer after the core ones. */
export function alarmRouters(ctx: AppContext, feature: AlarmFeature, doc: ApiDoc): Router[] {
  return [alarmsRouter(ctx, feature, doc), oncallRouter(ctx, doc), rulesRouter(ctx, feature, doc), mailAdminRouter(ctx, doc)];
}

import { Router } from 'express';
import type { AppContext } from '../app-context';
import { addOpenApiGroup, buildOpenApi } from '../openapi';
import { alarmsOpenApi } from '../openapi/alarm-paths';
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

/** Every core router, to be mounted at /api. Later features add theirs in createApp's `extraRouters`. */
export function coreRouters(ctx: AppContext): Router[] {
  const docs = Router();
  docs.get('/openapi.json', (_req, res) => {
    res.json(buildOpenApi());
  });
  return [
    docs,
    healthRouter(ctx),
    authRouter(ctx),
    sitesRouter(ctx),
    enginesRouter(ctx),
    devicesRouter(ctx),
    usersRouter(ctx),
    workOrdersRouter(ctx),
    calcRouter(ctx),
    coolantRouter(ctx),
    engineHistoryRouter(ctx),
  ];
}

/** The alarm feature's routers (alarms, on-call, rules, mail), mounted by startServer after the core ones. */
export function alarmRouters(ctx: AppContext, feature: AlarmFeature): Router[] {
  addOpenApiGroup(alarmsOpenApi);
  return [alarmsRouter(ctx, feature), oncallRouter(ctx), rulesRouter(ctx, feature), mailAdminRouter(ctx)];
}

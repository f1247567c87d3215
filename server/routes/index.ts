import { Router } from 'express';
import type { AppContext } from '../app-context';
import { buildOpenApi } from '../openapi';
import { authRouter } from './auth';
import { calcRouter } from './calc';
import { coolantRouter } from './coolant';
import { devicesRouter } from './devices';
import { engineHistoryRouter } from './engine-history';
import { enginesRouter } from './engines';
import { healthRouter } from './health';
import { sitesRouter } from './sites';
import { usersRouter } from './users';
import { workOrdersRouter } from './work-orders';

/** Every core router, to be mounted at /api. Later features add theirs in createApp's `extraRouters`. */
export function coreRouters(ctx: AppContext): Router[] {
  const docs = Router();
  docs.get('/openapi.json', (_req, res) => {
    res.json(buildOpenApi());
  });
  return [docs, healthRouter(ctx), authRouter(ctx), sitesRouter(ctx), enginesRouter(ctx), devicesRouter(ctx), usersRouter(ctx), workOrdersRouter(ctx), calcRouter(ctx), coolantRouter(ctx), engineHistoryRouter(ctx)];
}

import { Router } from 'express';
import type { AppContext } from '../app-context';
import { requireAuth } from '../auth/middleware';
import { addOpenApiGroup } from '../openapi';
import { historyOpenApi } from '../openapi/history-paths';
import { engineHistory } from '../services/engine-history';
import { assertEngineVisible, siteScopeOf } from '../services/site-access';
import { parseId } from './validate';

/** An engine's service history (every signed-in role reads it; another site's engine reads as not found). */
export function engineHistoryRouter(ctx: AppContext): Router {
  addOpenApiGroup(historyOpenApi);
  const r = Router();
  r.get('/engines/:id/history', requireAuth, async (req, res) => {
    const id = parseId(req.params);
    await assertEngineVisible(ctx.models, await siteScopeOf(req), id);
    res.json(await engineHistory(ctx.models, id));
  });
  return r;
}

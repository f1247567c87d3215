import { Router } from 'express';
import type { AppContext } from '../app-context';
import { requireAuth } from '../auth/middleware';
import { route, type ApiDoc } from '../openapi/api-doc';
import { EngineHistory } from '../openapi/work-schemas';
import { engineHistory } from '../services/engine-history';
import { assertEngineVisible, siteScopeOf } from '../services/site-access';
import { idParam, parseId } from './validate';

/** An engine's service history (every signed-in role reads it; another site's engine reads as not found). */
export function engineHistoryRouter(ctx: AppContext, doc: ApiDoc): Router {
  const r = Router();
  route(doc, {
    method: 'get',
    path: '/engines/:id/history',
    id: 'getEngineHistory',
    tag: 'service history',
    summary: "An engine's service history, newest first",
    description:
      'Work orders (open and closed, with parts, fluids and manual-check overrides), coolant tests with their decisions, run-hours corrections and service events.',
    access: 'signed-in',
    params: idParam,
    ok: EngineHistory,
  });
  r.get('/engines/:id/history', requireAuth, async (req, res) => {
    const id = parseId(req.params);
    await assertEngineVisible(ctx.models, await siteScopeOf(req), id);
    res.json(await engineHistory(ctx.models, id));
  });
  return r;
}

import { Router } from 'express';
import { z } from 'zod';
import { requireAuth, requireRole } from '../auth/middleware';
import type { AppContext } from '../app-context';
import { siteScopeOf } from '../services/site-access';
import { createSite, listSites, retireSite, updateSite } from '../services/sites';
import { idParam, parse, parseId, timeZone } from './validate';
import { route, type ApiDoc } from '../openapi/api-doc';
import { Site } from '../openapi/core-schemas';
import { ELEVATION_MAX_M, ELEVATION_MIN_M } from '../../shared/atmosphere';

const siteFields = {
  name: z.string().trim().min(1).max(120),
  timeZone,
  /** Lowest expected temperature, °C (coolant freeze protection is judged against it). */
  designLowTempC: z.number().min(-80, 'at least -80 degC').max(40, 'at most 40 degC').nullable().optional(),
};
/** Metres above mean sea level (null: unknown, sea level); the ICAO standard atmosphere's range used here. */
const elevationM = z.number().finite().min(ELEVATION_MIN_M).max(ELEVATION_MAX_M).nullable();
const createBody = z.strictObject(siteFields);
const patchBody = z.strictObject({ ...siteFields, elevationM }).partial();
const listQuery = z.object({ includeRetired: z.enum(['true', 'false']).optional() });

export function sitesRouter(ctx: AppContext, doc: ApiDoc): Router {
  const r = Router();
  const tag = 'sites';
  r.use('/sites', requireAuth);
  route(doc, { method: 'get', path: '/sites', id: 'listSites', tag, summary: 'Sites', access: 'signed-in', query: listQuery, ok: z.array(Site) });
  r.get('/sites', async (req, res) => {
    const q = parse(listQuery, req.query);
    res.json(await listSites(ctx.models, q.includeRetired === 'true', await siteScopeOf(req)));
  });
  route(doc, { method: 'post', path: '/sites', id: 'createSite', tag, summary: 'Create a site', access: ['admin'], body: createBody, ok: Site, status: 201 });
  r.post('/sites', requireRole('admin'), async (req, res) => {
    res.status(201).json(await createSite(ctx.models, parse(createBody, req.body)));
  });
  route(doc, {
    method: 'patch',
    path: '/sites/:id',
    id: 'updateSite',
    tag,
    summary: 'Change a site',
    access: ['admin'],
    params: idParam,
    body: patchBody,
    ok: Site,
  });
  r.patch('/sites/:id', requireRole('admin'), async (req, res) => {
    const id = parseId(req.params);
    res.json(await updateSite(ctx.models, id, parse(patchBody, req.body)));
  });
  route(doc, { method: 'delete', path: '/sites/:id', id: 'retireSite', tag, summary: 'Retire a site', access: ['admin'], params: idParam, ok: Site });
  r.delete('/sites/:id', requireRole('admin'), async (req, res) => {
    res.json(await retireSite(ctx.models, parseId(req.params)));
  });
  return r;
}

import { Router } from 'express';
import { z } from 'zod';
import { CHANNEL_KEYS } from '../../shared/channels';
import { requireAuth, requireRole } from '../auth/middleware';
import type { AppContext } from '../app-context';
import { badRequest } from '../http-error';
import { COOLANT_FAMILIES, DUTIES, GLYCOL_TYPES } from '../models/engine';
import { activeAlarmCounts } from '../services/alarms/alarm-queries';
import { standbyReadinessOf } from '../services/readiness';
import { freezeStatusOf } from '../services/coolant/freeze-status';
import { createEngine, engineView, getEngine, listEngines, listEnginesPage, retireEngine, updateEngine } from '../services/engines';
import { queryBuckets } from '../services/readings-query';
import { assertEngineVisible, siteFilter, siteScopeOf } from '../services/site-access';
import { idParam, instant, parse, parseId } from './validate';
import { listOrPage, route, type ApiDoc } from '../openapi/api-doc';
import { Buckets, Engine, EngineStatus } from '../openapi/core-schemas';
import { pageFields, pageOf } from '../services/list-page';

const range = (min: number, max: number, unit: string) => z.number().min(min, `at least ${min} ${unit}`).max(max, `at most ${max} ${unit}`);

// SI only; ranges are common practice for stationary engines, wide enough for any real one
const engineFields = {
  siteId: z.number().int().positive(),
  name: z.string().trim().min(1).max(120),
  duty: z.enum(DUTIES),
  capacityL: range(1, 5000, 'L'),
  coolantFamily: z.enum(COOLANT_FAMILIES),
  glycolType: z.enum(GLYCOL_TYPES),
  glycolPercent: range(0, 70, '%'),
  capPressureKpa: range(0, 300, 'kPa'),
  oilDrainIntervalH: range(50, 5000, 'h'),
  runHours: range(0, 1_000_000, 'h'),
  safeOpenTempC: range(20, 70, 'degC'),
  heaterSetpointC: range(5, 70, 'degC').nullable(),
  outOfService: z.boolean(),
};
const createBody = z.strictObject({
  ...engineFields,
  duty: engineFields.duty.default('standby'),
  coolantFamily: engineFields.coolantFamily.default('conventional'),
  glycolType: engineFields.glycolType.default('ethylene'),
  glycolPercent: engineFields.glycolPercent.default(50),
  capPressureKpa: engineFields.capPressureKpa.default(100),
  oilDrainIntervalH: engineFields.oilDrainIntervalH.default(250),
  runHours: engineFields.runHours.default(0),
  safeOpenTempC: engineFields.safeOpenTempC.default(50),
  heaterSetpointC: engineFields.heaterSetpointC.default(null),
  outOfService: engineFields.outOfService.default(false),
});
const patchBody = z.strictObject(engineFields).partial();
const listQuery = z.object({ siteId: z.coerce.number().int().positive().optional(), includeRetired: z.enum(['true', 'false']).optional(), ...pageFields });

const DAY_MS = 24 * 3600 * 1000;
const readingsQuery = z.object({
  channel: z.enum(CHANNEL_KEYS as [string, ...string[]]),
  from: instant.optional(),
  to: instant.optional(),
  points: z.coerce.number().int().min(1).max(2000).default(500),
});

export function enginesRouter(ctx: AppContext, doc: ApiDoc): Router {
  const r = Router();
  const tag = 'engines';
  const live = () => ctx.telemetry?.liveState ?? null;
  r.use('/engines', requireAuth);
  route(doc, {
    method: 'get',
    path: '/engines',
    id: 'listEngines',
    tag,
    summary: 'Engines with live values',
    access: 'signed-in',
    query: listQuery,
    ok: listOrPage(EngineStatus),
  });
  r.get('/engines', async (req, res) => {
    const q = parse(listQuery, req.query);
    const siteIds = siteFilter(await siteScopeOf(req), q.siteId);
    const opts = { siteIds: siteIds ?? undefined, includeRetired: q.includeRetired === 'true', q: q.q };
    const page = pageOf(q);
    const found = page ? await listEnginesPage(ctx.models, opts, page) : { rows: await listEngines(ctx.models, opts), total: 0 };
    const engines = found.rows;
    const [alarmCounts, readiness, freeze] = await Promise.all([
      activeAlarmCounts(ctx.models, page ? engines.map((e) => e.id) : undefined),
      standbyReadinessOf(ctx.models, engines, live()),
      freezeStatusOf(ctx.models, engines),
    ]);
    // standby engines carry readiness: { ready, reasons } (reasons in words); engines with a glycol or freeze-point test carry freezeProtection
    const views = engines.map((e) => ({
      ...engineView(e, live()),
      activeAlarms: alarmCounts.get(e.id) ?? 0,
      ...(readiness.has(e.id) ? { readiness: readiness.get(e.id) } : {}),
      ...(freeze.has(e.id) ? { freezeProtection: freeze.get(e.id) } : {}),
    }));
    // with offset: one page and the number matching; without: the whole list (the fleet board's tiles)
    res.json(page ? { items: views, total: found.total, limit: page.limit, offset: page.offset } : views);
  });
  route(doc, {
    method: 'get',
    path: '/engines/:id',
    id: 'getEngine',
    tag,
    summary: 'One engine with live values',
    access: 'signed-in',
    params: idParam,
    ok: EngineStatus,
  });
  r.get('/engines/:id', async (req, res) => {
    const id = parseId(req.params);
    await assertEngineVisible(ctx.models, await siteScopeOf(req), id);
    const engine = await getEngine(ctx.models, id);
    const readiness = (await standbyReadinessOf(ctx.models, [engine], live())).get(engine.id);
    const freeze = (await freezeStatusOf(ctx.models, [engine])).get(engine.id);
    res.json({
      ...engineView(engine, live()),
      activeAlarms: (await activeAlarmCounts(ctx.models)).get(engine.id) ?? 0,
      ...(readiness ? { readiness } : {}),
      ...(freeze ? { freezeProtection: freeze } : {}),
    });
  });
  route(doc, {
    method: 'get',
    path: '/engines/:id/readings',
    id: 'getEngineReadings',
    tag,
    summary: 'Bucketed readings: raw for short spans, per-minute or per-hour rollups for long ones or before the raw retention',
    description: '`from` and `to`: epoch ms or ISO 8601; default the last 24 h; at most 400 days.',
    access: 'signed-in',
    params: idParam,
    query: readingsQuery,
    ok: Buckets,
  });
  r.get('/engines/:id/readings', async (req, res) => {
    const id = parseId(req.params);
    const q = parse(readingsQuery, req.query);
    const to = q.to ?? Date.now();
    const from = q.from ?? to - DAY_MS;
    if (from >= to) throw badRequest('from must be before to', 'from');
    if (to - from > 400 * DAY_MS) throw badRequest('span is at most 400 days', 'from');
    await assertEngineVisible(ctx.models, await siteScopeOf(req), id);
    await getEngine(ctx.models, id);
    const retention = { rawRetentionDays: ctx.config.rawRetentionDays, now: Date.now() };
    res.json(await queryBuckets(ctx.sequelize, { engineId: id, channel: q.channel as (typeof CHANNEL_KEYS)[number], from, to, points: q.points }, retention));
  });
  route(doc, {
    method: 'post',
    path: '/engines',
    id: 'createEngine',
    tag,
    summary: 'Create an engine',
    access: ['admin'],
    body: createBody,
    ok: Engine,
    status: 201,
  });
  r.post('/engines', requireRole('admin'), async (req, res) => {
    res.status(201).json(engineView(await createEngine(ctx.models, parse(createBody, req.body)), live()));
  });
  route(doc, {
    method: 'patch',
    path: '/engines/:id',
    id: 'updateEngine',
    tag,
    summary: 'Change an engine',
    access: ['admin'],
    params: idParam,
    body: patchBody,
    ok: Engine,
  });
  r.patch('/engines/:id', requireRole('admin'), async (req, res) => {
    const id = parseId(req.params);
    res.json(engineView(await updateEngine(ctx.models, id, parse(patchBody, req.body)), live()));
  });
  route(doc, { method: 'delete', path: '/engines/:id', id: 'retireEngine', tag, summary: 'Retire an engine', access: ['admin'], params: idParam, ok: Engine });
  r.delete('/engines/:id', requireRole('admin'), async (req, res) => {
    res.json(engineView(await retireEngine(ctx.models, parseId(req.params)), live()));
  });
  return r;
}

import { Router, type Request } from 'express';
import { z } from 'zod';
import { ALARM_STATES, SHELVE_MAX_MINUTES, SHELVE_MIN_MINUTES, type AlarmState } from '../../shared/alarms/alarm-state';
import { PRIORITIES } from '../services/alarms/priority';
import { requireAuth, requireRole } from '../auth/middleware';
import type { AppContext } from '../app-context';
import { badRequest } from '../http-error';
import type { AlarmFeature } from '../services/alarms';
import { assertAlarmVisible, siteFilter, siteScopeOf, visibleEngineIds } from '../services/site-access';
import { idParam, instant, parse, parseId } from './validate';
import { listOrPage, route, type ApiDoc } from '../openapi/api-doc';
import { Alarm, AlarmDetail, AlarmHistoryPage, AlarmPerformance, AlarmSummary } from '../openapi/alarm-schemas';
import { engineIdsMatching, pageFields, pageOf, PAGE_MAX_LIMIT } from '../services/list-page';

const listQuery = z.object({
  state: z.enum(['active', 'shelved', 'open', 'all']).default('active'),
  engineId: z.coerce.number().int().positive().optional(),
  siteId: z.coerce.number().int().positive().optional(),
  priority: z.enum(PRIORITIES).optional(),
  /** One alarm state within the chosen set (state=all&alarmState=acknowledged). */
  alarmState: z.enum(ALARM_STATES as unknown as [AlarmState, ...AlarmState[]]).optional(),
  /** Without offset: the older whole-list answer, at most this many (default 500); with offset: the page size (default 50, at most 500). */
  limit: z.coerce
    .number({ error: 'must be a whole number from 1 to 1000' })
    .int('must be a whole number from 1 to 1000')
    .min(1, 'must be at least 1')
    .max(1000, 'must be at most 1000')
    .optional(),
  offset: pageFields.offset,
  q: pageFields.q,
});
const ackBody = z.strictObject({ note: z.string().trim().max(1000).optional() }).optional();
const shelveBody = z.strictObject({
  minutes: z.number().int().min(SHELVE_MIN_MINUTES).max(SHELVE_MAX_MINUTES),
  reason: z.string().trim().min(1, 'a reason is required').max(500),
});
const noteBody = z.strictObject({ note: z.string().trim().min(1, 'a note is required').max(1000) });
const DAY = 86400_000;
const perfQuery = z.object({
  from: instant.optional(),
  to: instant.optional(),
  chatterCount: z.coerce.number().int().min(2).max(100).optional(),
  chatterWindowS: z.coerce.number().int().min(1).max(86_400).optional(),
});
const pageQuery = z.object({
  limit: z.coerce.number().int().min(1).max(1000).default(200),
  offset: z.coerce.number().int().min(0).default(0),
});

/** /api/alarms: lists, one alarm with history, acknowledge, shelve, notes, summary and performance. */
export function alarmsRouter(ctx: AppContext, feature: AlarmFeature, doc: ApiDoc): Router {
  const r = Router();
  const tag = 'alarms';
  const svc = feature.alarms;
  // engines the caller may see (null: all); an alarm of another site reads as not found
  const engineIds = async (req: Request) => visibleEngineIds(ctx.models, await siteScopeOf(req));
  const visible = async (req: Request, id: number) => assertAlarmVisible(ctx.models, await siteScopeOf(req), id);
  r.use('/alarms', requireAuth);
  route(doc, { method: 'get', path: '/alarms', id: 'listAlarms', tag, summary: 'Alarms', access: 'signed-in', query: listQuery, ok: listOrPage(Alarm) });
  r.get('/alarms', async (req, res) => {
    const q = parse(listQuery, req.query);
    const scope = await siteScopeOf(req);
    const filters = {
      state: q.state,
      engineId: q.engineId,
      priority: q.priority,
      alarmState: q.alarmState,
      // siteId: that site's engines if the caller may see it (none otherwise)
      engineIds:
        q.siteId !== undefined
          ? ((await visibleEngineIds(ctx.models, { all: false, siteIds: siteFilter(scope, q.siteId) ?? [] })) ?? [])
          : ((await visibleEngineIds(ctx.models, scope)) ?? undefined),
      textEngineIds: q.q ? await engineIdsMatching(ctx.models, ctx.sequelize, q.q) : undefined,
    };
    const page = pageOf(q);
    if (!page) return void res.json(await svc.list({ ...filters, limit: q.limit ?? 500 }));
    if (page.limit > PAGE_MAX_LIMIT) throw badRequest(`limit: must be at most ${PAGE_MAX_LIMIT} for a page`, 'limit');
    res.json(await svc.listPage({ ...filters, ...page }));
  });
  route(doc, {
    method: 'get',
    path: '/alarms/summary',
    id: 'getAlarmSummary',
    tag,
    summary: 'Open alarms counted by state and priority, and the flood state',
    access: 'signed-in',
    ok: AlarmSummary,
  });
  r.get('/alarms/summary', async (req, res) => {
    res.json(await svc.summary(Date.now(), (await engineIds(req)) ?? undefined));
  });
  route(doc, {
    method: 'get',
    path: '/alarms/performance',
    id: 'getAlarmPerformance',
    tag,
    summary: 'Alarm-system performance figures (ISA-18.2 style) over a span, default the last 7 days, at most 400',
    access: 'signed-in',
    query: perfQuery,
    ok: AlarmPerformance,
  });
  r.get('/alarms/performance', async (req, res) => {
    const q = parse(perfQuery, req.query);
    const to = q.to ?? Date.now();
    const from = q.from ?? to - 7 * DAY;
    if (from >= to) throw badRequest('from must be before to', 'from');
    if (to - from > 400 * DAY) throw badRequest('span is at most 400 days', 'from');
    const chatter = { count: q.chatterCount, windowMs: q.chatterWindowS === undefined ? undefined : q.chatterWindowS * 1000 };
    res.json(await svc.performance(from, to, (await engineIds(req)) ?? undefined, chatter));
  });
  route(doc, {
    method: 'get',
    path: '/alarms/:id',
    id: 'getAlarm',
    tag,
    summary: 'One alarm with its meaning, first step and a page of history',
    access: 'signed-in',
    params: idParam,
    query: pageQuery,
    ok: AlarmDetail,
  });
  r.get('/alarms/:id', async (req, res) => {
    const id = parseId(req.params);
    const page = parse(pageQuery, req.query);
    await visible(req, id);
    res.json(await svc.get(id, page));
  });
  route(doc, {
    method: 'get',
    path: '/alarms/:id/history',
    id: 'getAlarmHistory',
    tag,
    summary: "A page of an alarm's history, in time order",
    access: 'signed-in',
    params: idParam,
    query: pageQuery,
    ok: AlarmHistoryPage,
  });
  r.get('/alarms/:id/history', async (req, res) => {
    const id = parseId(req.params);
    const page = parse(pageQuery, req.query);
    await visible(req, id);
    await svc.get(id, { limit: 1 }); // 404 for an unknown alarm
    res.json(await svc.history(id, page));
  });
  route(doc, {
    method: 'post',
    path: '/alarms/:id/acknowledge',
    id: 'acknowledgeAlarm',
    tag,
    summary: 'Acknowledge an alarm, with an optional note',
    access: ['operator', 'technician', 'planner', 'admin'],
    params: idParam,
    body: ackBody,
    bodyOptional: true,
    ok: Alarm,
    errors: [409],
  });
  r.post('/alarms/:id/acknowledge', requireRole('operator', 'technician', 'planner', 'admin'), async (req, res) => {
    const id = parseId(req.params);
    const b = parse(ackBody, req.body ?? undefined);
    await visible(req, id);
    res.json(await svc.acknowledge(id, req.user!, b?.note || null));
  });
  route(doc, {
    method: 'post',
    path: '/alarms/:id/shelve',
    id: 'shelveAlarm',
    tag,
    summary: 'Shelve an alarm for some minutes, with the reason',
    access: ['planner', 'admin'],
    params: idParam,
    body: shelveBody,
    ok: Alarm,
    errors: [409],
  });
  r.post('/alarms/:id/shelve', requireRole('planner', 'admin'), async (req, res) => {
    const id = parseId(req.params);
    const b = parse(shelveBody, req.body);
    await visible(req, id);
    res.json(await svc.shelve(id, req.user!, b.minutes, b.reason));
  });
  route(doc, {
    method: 'post',
    path: '/alarms/:id/unshelve',
    id: 'unshelveAlarm',
    tag,
    summary: 'Take an alarm off the shelf',
    access: ['planner', 'admin'],
    params: idParam,
    ok: Alarm,
    errors: [409],
  });
  r.post('/alarms/:id/unshelve', requireRole('planner', 'admin'), async (req, res) => {
    const id = parseId(req.params);
    await visible(req, id);
    res.json(await svc.unshelve(id, req.user!));
  });
  route(doc, {
    method: 'post',
    path: '/alarms/:id/notes',
    id: 'addAlarmNote',
    tag,
    summary: 'Add a note to an alarm',
    access: ['operator', 'technician', 'planner', 'admin'],
    params: idParam,
    body: noteBody,
    ok: Alarm,
    status: 201,
  });
  r.post('/alarms/:id/notes', requireRole('operator', 'technician', 'planner', 'admin'), async (req, res) => {
    const id = parseId(req.params);
    const b = parse(noteBody, req.body);
    await visible(req, id);
    res.status(201).json(await svc.addNote(id, req.user!, b.note));
  });
  return r;
}

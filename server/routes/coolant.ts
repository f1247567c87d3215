import { Router, type NextFunction, type Request, type Response } from 'express';
import multer from 'multer';
import { z } from 'zod';
import type { AppContext } from '../app-context';
import { requireAuth, requireRole } from '../auth/middleware';
import { badRequest, HttpError } from '../http-error';
import { route, type ApiDoc } from '../openapi/api-doc';
import {
  AdditiveProfile,
  CoolantLimits,
  CoolantTest,
  DueList,
  DueListPage,
  LabImport,
  PlanTask,
  RunHoursAdjustment,
  RunHoursCorrected,
  TopUp,
  TopUps,
} from '../openapi/coolant-schemas';
import { TEST_METHODS, TOP_UP_LIQUIDS } from '../models/coolant-models';
import { BREAKDOWN_SIGNS } from '../../shared/coolant/chemistry';
import { getAdditiveProfile, saveAdditiveProfile } from '../services/coolant/additive-profile';
import { getChemistryLimits, saveChemistryLimits } from '../services/coolant/chemistry-limits';
import { listTopUps, recordTopUp } from '../services/coolant/top-ups';
import { importLabCsv, listCoolantTests, recordCoolantTest } from '../services/coolant/coolant-tests';
import { runHoursCounterFor } from '../services/coolant';
import { correctRunHours, runHoursHistory } from '../services/coolant/run-hours';
import { clearOverride, dueListFor, dueListPage, enginePlan, setOverride } from '../services/coolant/service-plan';
import { pageFields, pageOf } from '../services/list-page';
import { assertEngineVisible, siteFilter, siteScopeOf } from '../services/site-access';
import { idParam, parse, parseId, recordedInstant } from './validate';

export const LAB_CSV_MAX_BYTES = 2 * 1024 * 1024;

const range = (min: number, max: number, unit: string) => z.number().min(min, `at least ${min} ${unit}`).max(max, `at most ${max} ${unit}`);
const optionalReading = (min: number, max: number, unit: string) => range(min, max, unit).nullable().default(null);

const testBody = z.strictObject({
  testedAt: recordedInstant.optional(),
  method: z.enum(TEST_METHODS),
  scaUnitsPerGal: optionalReading(0, 100, 'units/US gal'),
  glycolPercent: optionalReading(0, 100, '%'),
  freezePointC: optionalReading(-80, 10, 'degC'),
  ph: optionalReading(0, 14, ''),
  conductivityUsCm: optionalReading(0, 200000, 'uS/cm'),
  nitritePpm: optionalReading(0, 100000, 'ppm'),
  molybdatePpm: optionalReading(0, 100000, 'ppm'),
  reserveAlkalinityMl: optionalReading(0, 100, 'mL'),
  /** Signs of glycol breakdown looked for; absent or null = not looked at, [] = none seen. */
  breakdownSigns: z.array(z.enum(BREAKDOWN_SIGNS)).max(BREAKDOWN_SIGNS.length).nullable().default(null),
  appearance: z.string().trim().max(200).nullable().default(null),
  notes: z.string().trim().max(2000).nullable().default(null),
});
const limitsBody = z
  .strictObject({
    nitriteLowPpm: range(0, 100000, 'ppm'),
    nitriteHighPpm: range(0, 100000, 'ppm'),
    molybdateLowPpm: range(0, 100000, 'ppm'),
    molybdateHighPpm: range(0, 100000, 'ppm'),
    phLow: range(0, 14, ''),
    phHigh: range(0, 14, ''),
    reserveAlkalinityLowMl: range(0, 100, 'mL'),
    freezeMarginK: range(0, 30, 'K'),
    extender: z
      .strictObject({ everyHours: range(1, 100000, 'h').nullable().default(null), everyDays: range(1, 3650, 'days').nullable().default(null) })
      .nullable(),
  })
  .partial();
const topUpBody = z.strictObject({
  addedAt: recordedInstant.optional(),
  volumeL: z.number().gt(0, 'above 0 L').max(10000, 'at most 10000 L'),
  liquid: z.enum(TOP_UP_LIQUIDS),
  premixPercent: range(0, 100, '%').nullable().default(null),
  notes: z.string().trim().max(500).nullable().default(null),
});
const runHoursBody = z.strictObject({ runHours: range(0, 1_000_000, 'h'), reason: z.string().trim().min(3, 'say why (at least 3 characters)').max(500) });
const profileBody = z
  .strictObject({
    name: z.string().trim().min(1).max(80),
    liquidUnitsPerLitre: z.number().gt(0, 'above 0 units/L').max(100000, 'at most 100000 units/L'),
    filterSizes: z.array(z.strictObject({ label: z.string().trim().min(1).max(60), prechargeUnits: range(0, 100000, 'units') })).max(20),
    scaLow: range(0, 100, 'units/US gal').default(1.2),
    scaHigh: range(0, 100, 'units/US gal').default(3.0),
  })
  .refine((p) => p.scaHigh > p.scaLow, { message: 'must be above scaLow', path: ['scaHigh'] });
const overrideBody = z.strictObject({
  title: z.string().trim().min(1).max(200).nullable().optional(),
  everyHours: range(1, 100000, 'h').nullable().optional(),
  everyDays: range(1, 3650, 'days').nullable().optional(),
  disabled: z.boolean().optional(),
});
const taskParam = z.object({ id: z.coerce.number().int().positive(), taskKey: z.string().regex(/^[a-z0-9-]{1,40}$/, 'lower-case letters, digits and dashes') });
const dueQuery = z.object({
  siteId: z.coerce.number().int().positive().optional(),
  engineId: z.coerce.number().int().positive().optional(),
  windowDays: z.coerce.number().int().min(0).max(365).default(14),
  windowHours: z.coerce.number().min(0).max(5000).default(50),
  include: z.enum(['due', 'all']).default('due'),
  ...pageFields,
});
const importQuery = z.object({ preview: z.enum(['0', '1', 'true', 'false']).optional(), engineId: z.coerce.number().int().positive().optional() });

const labForm = z.object({ file: z.string().openapi({ format: 'binary', description: 'the lab CSV (layout in the README), at most 2 MB' }) });

const RECORDERS = ['technician', 'planner', 'admin'] as const;
const PLANNERS = ['planner', 'admin'] as const;

const upload = multer({ storage: multer.memoryStorage(), limits: { fileSize: LAB_CSV_MAX_BYTES, files: 1, fields: 5 } }).single('file');

/** multer with our error shape: too large -> 413, anything else -> 400 naming `file`. */
function labUpload(req: Request, res: Response, next: NextFunction): void {
  upload(req, res, (err: unknown) => {
    if (!err) return next();
    if (err instanceof multer.MulterError) {
      if (err.code === 'LIMIT_FILE_SIZE') return next(new HttpError(413, `file is larger than ${LAB_CSV_MAX_BYTES / 1024 / 1024} MB`, 'file'));
      return next(badRequest(`upload refused: ${err.message}`, err.field ?? 'file'));
    }
    next(badRequest('upload is not a readable multipart form', 'file'));
  });
}

/** Coolant tests, lab import, additive profile, run hours, service plan and the due list. */
export function coolantRouter(ctx: AppContext, doc: ApiDoc): Router {
  const r = Router();
  const tag = 'coolant';
  const m = ctx.models;
  for (const p of [
    '/engines/:id/coolant-tests',
    '/engines/:id/coolant-top-ups',
    '/engines/:id/run-hours',
    '/engines/:id/service-plan',
    '/coolant-tests',
    '/additive-profile',
    '/coolant-limits',
    '/due-list',
  ])
    r.use(p, requireAuth);
  // an engine of a site the caller may not see reads as not found
  for (const p of ['/engines/:id/coolant-tests', '/engines/:id/coolant-top-ups', '/engines/:id/run-hours', '/engines/:id/service-plan']) {
    r.use(p, async (req, _res, next) => {
      await assertEngineVisible(m, await siteScopeOf(req), parseId(req.params));
      next();
    });
  }

  route(doc, {
    method: 'get',
    path: '/engines/:id/coolant-tests',
    id: 'listCoolantTests',
    tag,
    summary: "An engine's coolant tests, newest first",
    access: 'signed-in',
    params: idParam,
    ok: z.array(CoolantTest),
  });
  r.get('/engines/:id/coolant-tests', async (req, res) => {
    res.json(await listCoolantTests(m, parseId(req.params)));
  });
  route(doc, {
    method: 'post',
    path: '/engines/:id/coolant-tests',
    id: 'recordCoolantTest',
    tag,
    summary: 'Record a coolant test; the additive decision and chemistry findings are computed and stored with their reasons',
    access: RECORDERS,
    params: idParam,
    body: testBody,
    ok: CoolantTest,
    status: 201,
  });
  r.post('/engines/:id/coolant-tests', requireRole(...RECORDERS), async (req, res) => {
    const id = parseId(req.params);
    const b = parse(testBody, req.body);
    const testedAt = b.testedAt ?? Date.now();
    res.status(201).json(await recordCoolantTest(m, id, { ...b, testedAt: new Date(testedAt) }, req.user!.id));
  });

  route(doc, {
    method: 'get',
    path: '/engines/:id/coolant-top-ups',
    id: 'listCoolantTopUps',
    tag,
    summary: 'Top-ups since the last test, with the estimated dilution',
    access: 'signed-in',
    params: idParam,
    ok: TopUps,
  });
  r.get('/engines/:id/coolant-top-ups', async (req, res) => {
    res.json(await listTopUps(m, parseId(req.params)));
  });
  route(doc, {
    method: 'post',
    path: '/engines/:id/coolant-top-ups',
    id: 'recordCoolantTopUp',
    tag,
    summary: 'Record a coolant top-up',
    access: RECORDERS,
    params: idParam,
    body: topUpBody,
    ok: TopUp,
    status: 201,
  });
  r.post('/engines/:id/coolant-top-ups', requireRole(...RECORDERS), async (req, res) => {
    const id = parseId(req.params);
    const b = parse(topUpBody, req.body);
    const addedAt = b.addedAt ?? Date.now();
    res.status(201).json(await recordTopUp(m, id, { ...b, addedAt: new Date(addedAt) }, req.user!.id));
  });

  route(doc, {
    method: 'post',
    path: '/coolant-tests/import',
    id: 'importLabCsv',
    tag,
    summary: 'Import lab results from CSV: good rows stored (201), bad rows reported with line and field',
    description: [
      'Header row required, columns in any order: `engine_id,tested_at,method,sca_units_per_gal,glycol_percent,freeze_point_c,ph,conductivity_us_cm,appearance,nitrite_ppm,molybdate_ppm`',
      '(`engine_id` may be left out with `?engineId=`). UTF-8 or Windows-1252 (converted), `,` or `;` between fields, quoted fields may span lines.',
      'tested_at: ISO 8601 with offset or Z, or YYYY-MM-DD (00:00 UTC); method: strip | refractometer | lab (blank = lab); blank number = not measured.',
      '`?preview=1` stores nothing (200); nothing stored also answers 200. Not text or not the layout: 400 naming `file`; over 2 MB: 413.',
    ].join(' '),
    access: RECORDERS,
    query: importQuery,
    form: labForm,
    ok: LabImport,
    status: 201,
    errors: [413],
    also: { 200: { description: 'a preview, or nothing stored', schema: LabImport } },
  });
  r.post('/coolant-tests/import', requireRole(...RECORDERS), labUpload, async (req, res) => {
    const q = parse(importQuery, req.query);
    if (!req.file) throw badRequest('send the CSV as multipart/form-data in the field "file"', 'file');
    const preview = q.preview === '1' || q.preview === 'true';
    const out = await importLabCsv(m, req.file.buffer, { preview, userId: req.user!.id, engineId: q.engineId, scope: await siteScopeOf(req) });
    res.status(preview || out.stored === 0 ? 200 : 201).json(out);
  });

  route(doc, {
    method: 'get',
    path: '/additive-profile',
    id: 'getAdditiveProfile',
    tag,
    summary: 'Additive profile: liquid strength, charged-filter pre-charges, SCA limits',
    access: 'signed-in',
    ok: AdditiveProfile,
  });
  r.get('/additive-profile', async (_req, res) => {
    res.json(await getAdditiveProfile(m));
  });
  route(doc, {
    method: 'put',
    path: '/additive-profile',
    id: 'saveAdditiveProfile',
    tag,
    summary: 'Set the additive profile',
    access: ['admin'],
    body: profileBody,
    ok: AdditiveProfile,
  });
  r.put('/additive-profile', requireRole('admin'), async (req, res) => {
    res.json(await saveAdditiveProfile(m, parse(profileBody, req.body), req.user!.id));
  });

  route(doc, {
    method: 'get',
    path: '/coolant-limits',
    id: 'getCoolantLimits',
    tag,
    summary: 'Chemistry limits and the extender interval, with the defaults',
    access: 'signed-in',
    ok: CoolantLimits,
  });
  r.get('/coolant-limits', async (_req, res) => {
    res.json(await getChemistryLimits(m));
  });
  route(doc, {
    method: 'put',
    path: '/coolant-limits',
    id: 'saveCoolantLimits',
    tag,
    summary: 'Set chemistry limits (the fields given)',
    access: ['admin'],
    body: limitsBody,
    ok: CoolantLimits,
  });
  r.put('/coolant-limits', requireRole('admin'), async (req, res) => {
    res.json(await saveChemistryLimits(m, parse(limitsBody, req.body), req.user!.id));
  });

  route(doc, {
    method: 'get',
    path: '/engines/:id/run-hours',
    id: 'listRunHoursCorrections',
    tag,
    summary: 'Hand corrections of run hours (audit), newest first',
    access: 'signed-in',
    params: idParam,
    ok: z.array(RunHoursAdjustment),
  });
  r.get('/engines/:id/run-hours', async (req, res) => {
    res.json(await runHoursHistory(m, parseId(req.params)));
  });
  route(doc, {
    method: 'post',
    path: '/engines/:id/run-hours',
    id: 'correctRunHours',
    tag,
    summary: 'Set run hours from the hour meter, with the reason',
    access: PLANNERS,
    params: idParam,
    body: runHoursBody,
    ok: RunHoursCorrected,
  });
  r.post('/engines/:id/run-hours', requireRole(...PLANNERS), async (req, res) => {
    const id = parseId(req.params);
    res.json(await correctRunHours(m, id, parse(runHoursBody, req.body), req.user!.id, runHoursCounterFor(ctx)));
  });

  route(doc, {
    method: 'get',
    path: '/engines/:id/service-plan',
    id: 'getServicePlan',
    tag,
    summary: 'Service plan of an engine: defaults plus its overrides',
    access: 'signed-in',
    params: idParam,
    ok: z.array(PlanTask),
  });
  r.get('/engines/:id/service-plan', async (req, res) => {
    res.json(await enginePlan(m, parseId(req.params)));
  });
  route(doc, {
    method: 'put',
    path: '/engines/:id/service-plan/:taskKey',
    id: 'overrideServiceTask',
    tag,
    summary: "Override a task of an engine's plan (title, interval, or off)",
    access: PLANNERS,
    params: taskParam,
    body: overrideBody,
    ok: z.array(PlanTask),
  });
  r.put('/engines/:id/service-plan/:taskKey', requireRole(...PLANNERS), async (req, res) => {
    const p = parse(taskParam, req.params);
    res.json(await setOverride(m, p.id, p.taskKey, parse(overrideBody, req.body), req.user!.id));
  });
  route(doc, {
    method: 'delete',
    path: '/engines/:id/service-plan/:taskKey',
    id: 'clearServiceTaskOverride',
    tag,
    summary: 'Back to the default task',
    access: PLANNERS,
    params: taskParam,
    ok: z.array(PlanTask),
  });
  r.delete('/engines/:id/service-plan/:taskKey', requireRole(...PLANNERS), async (req, res) => {
    const p = parse(taskParam, req.params);
    res.json(await clearOverride(m, p.id, p.taskKey));
  });

  route(doc, {
    method: 'get',
    path: '/due-list',
    id: 'getDueList',
    tag,
    summary: 'Service tasks overdue or due soon, by site',
    access: 'signed-in',
    query: dueQuery,
    ok: z.union([DueList, DueListPage]),
  });
  r.get('/due-list', async (req, res) => {
    const q = parse(dueQuery, req.query);
    const siteIds = siteFilter(await siteScopeOf(req), q.siteId) ?? undefined;
    const list = await dueListFor(m, {
      siteId: q.siteId,
      siteIds,
      engineId: q.engineId,
      windowDays: q.windowDays,
      windowHours: q.windowHours,
      includeOk: q.include === 'all',
      q: q.q,
      now: Date.now(),
    });
    // rows are computed, not stored: computed for the filtered engines (cheaply, in bulk), then one page sent
    const page = pageOf(q);
    res.json(page ? dueListPage(list, page) : list);
  });
  return r;
}

import { Router, type NextFunction, type Request, type Response } from 'express';
import multer from 'multer';
import { idempotencyHeaders, idempotent } from './idempotency';
import { z } from 'zod';
import type { AppContext } from '../app-context';
import { requireAuth, requireRole } from '../auth/middleware';
import { HttpError } from '../http-error';
import { PART_KINDS } from '../models/work-order-part';
import { WORK_PRIORITIES, WORK_STATUSES } from '../models/work-order';
import { WORK_KINDS, WORK_TEMPLATES } from '../services/work-templates';
import {
  assertAttachmentVisible,
  assertEngineVisible,
  assertWorkOrderVisible,
  engineVisible,
  siteScopeOf,
  visibleEngineIds,
  visibleUserIds,
} from '../services/site-access';
import { addAttachment, attachmentFile, MAX_ATTACHMENT_BYTES } from '../services/work-orders/attachment-service';
import { openingCheckOf } from '../services/work-orders/gate';
import { openingHistoryOf, type ReadingHistory } from '../services/work-orders/reading-history';
import { addAmendment, addPart } from '../services/work-orders/record-service';
import { TOP_UP_LIQUIDS } from '../models/coolant-models';
import { completeStep, GateShutError, saveDraft } from '../services/work-orders/step-service';
import { AlreadyRecordedError, recordOrderCoolantTest } from '../services/work-orders/coolant-test-service';
import { TEST_METHODS } from '../models/coolant-models';
import { WorkOrderService } from '../services/work-orders/work-order-service';
import { idParam, parse, parseId } from './validate';
import { listOrPage, route, type ApiDoc } from '../openapi/api-doc';
import {
  AlreadyRecorded,
  Assignee,
  Attachment,
  GateShut,
  OpeningCheck,
  OrderCoolantTest,
  WorkOrder,
  WorkOrderDetail,
  WorkTemplate,
} from '../openapi/work-schemas';
import { pageFields, pageOf } from '../services/list-page';

/** A whole calendar date, YYYY-MM-DD, that exists (no 2026-02-30), in 2000..2100: a half-typed year (0002, 0202) is refused. */
const dateOnly = z
  .string()
  .regex(/^\d{4}-\d{2}-\d{2}$/, 'a date YYYY-MM-DD')
  .refine((s) => {
    const d = new Date(`${s}T00:00:00Z`);
    return !Number.isNaN(d.getTime()) && d.toISOString().slice(0, 10) === s;
  }, 'not a date')
  .refine((s) => Number(s.slice(0, 4)) >= 2000 && Number(s.slice(0, 4)) <= 2100, 'a year from 2000 to 2100');
const note = z.string().trim().max(2000);
const createBody = z.strictObject({
  engineId: z.number().int().positive(),
  kind: z.enum(WORK_KINDS),
  alarmId: z.number().int().positive().optional(),
  title: z.string().trim().min(1).max(200).optional(),
  description: z.string().trim().max(4000).optional(),
  priority: z.enum(WORK_PRIORITIES).optional(),
  dueDate: dateOnly.nullable().optional(),
  assigneeId: z.number().int().positive().nullable().optional(),
  /** The service-plan task the order is for (the due list sends it); completing the order records it done. */
  serviceTaskKey: z.string().trim().min(1).max(64).optional(),
});
const planBody = z.strictObject({
  title: z.string().trim().min(1).max(200).optional(),
  description: z.string().trim().max(4000).nullable().optional(),
  priority: z.enum(WORK_PRIORITIES).optional(),
  dueDate: dateOnly.nullable().optional(),
  assigneeId: z.number().int().positive().nullable().optional(),
});
const listQuery = z.object({
  status: z
    .string()
    .optional()
    .transform((s, c) => {
      if (!s) return undefined;
      const list = s
        .split(',')
        .map((x) => x.trim())
        .filter(Boolean);
      for (const x of list)
        if (!(WORK_STATUSES as readonly string[]).includes(x)) {
          c.addIssue({ code: 'custom', message: `unknown status ${x}` });
          return z.NEVER;
        }
      return list as (typeof WORK_STATUSES)[number][];
    }),
  engineId: z.coerce.number().int().positive().optional(),
  assigneeId: z.coerce.number().int().positive().optional(),
  siteId: z.coerce.number().int().positive().optional(),
  mine: z.enum(['1', 'true', '0', 'false']).optional(),
  ...pageFields,
});
const transitionBody = z.strictObject({ to: z.enum(WORK_STATUSES), note: note.optional() });
const finite = (min: number, max: number, unit: string) => z.number().finite().min(min, `at least ${min} ${unit}`).max(max, `at most ${max} ${unit}`);
const manualCheck = z.strictObject({
  gaugeKpa: finite(-101, 1000, 'kPa'),
  tempC: finite(-40, 150, 'degC'),
  minutesSinceStop: finite(0, 100000, 'min'),
  checkedBy: z.string().trim().min(1).max(120),
  reason: z.string().trim().min(5, 'say why live data could not be used').max(1000),
});
const completeBody = z.strictObject({
  value: z.number().finite().optional(),
  unit: z.string().max(16).optional(),
  note: note.optional(),
  lockoutConfirmed: z.boolean().optional(),
  manualCheck: manualCheck.optional(),
  /** The top-up step of a top-up order: what was added; the volume is the step's value (L or gal). */
  topUp: z
    .strictObject({
      liquid: z.enum(TOP_UP_LIQUIDS),
      premixPercent: finite(0, 100, '%').nullable().default(null),
    })
    .optional(),
});
const draftBody = z.strictObject({
  value: z.number().finite().nullable().optional(),
  unit: z.string().max(16).optional(),
  note: z.string().max(2000).optional(),
});
const orderTestBody = z.strictObject({ method: z.enum(TEST_METHODS).optional() });
const partBody = z.strictObject({
  kind: z.enum(PART_KINDS),
  description: z.string().trim().max(300).optional(),
  quantity: z.number().finite().positive().max(5000),
  unit: z.enum(['L', 'gal', 'pcs']),
});
const amendmentBody = z.strictObject({ text: z.string().trim().min(1).max(4000) });
const stepParams = z.object({ id: z.coerce.number().int().positive(), stepId: z.coerce.number().int().positive() });
const uploadFields = z.object({ stepId: z.coerce.number().int().positive().optional() });
const openingQuery = z.object({ lockoutConfirmed: z.enum(['true', 'false']).optional() });
const uploadForm = uploadFields.extend({ file: z.string().openapi({ format: 'binary', description: 'JPEG, PNG, WebP or PDF, checked by content' }) });

// defParamCharset utf8: browsers send a file name as raw UTF-8 bytes; multer's default (latin1) garbles it
const upload = multer({ storage: multer.memoryStorage(), defParamCharset: 'utf8', limits: { fileSize: MAX_ATTACHMENT_BYTES, files: 1, fields: 5, parts: 6 } });
function singleFile(req: Request, res: Response, next: NextFunction) {
  upload.single('file')(req, res, (err: unknown) => {
    if (!err) return next();
    if (err instanceof multer.MulterError) {
      if (err.code === 'LIMIT_FILE_SIZE') return next(new HttpError(413, `a file may be at most ${MAX_ATTACHMENT_BYTES / 1024 / 1024} MB`, 'file'));
      return next(new HttpError(400, `upload refused: ${err.message}`, err.field ?? 'file'));
    }
    next(err);
  });
}

export interface WorkRouterHandle {
  router: Router;
  service: WorkOrderService;
  history: ReadingHistory;
}

export function workOrdersRouterWithService(ctx: AppContext, doc: ApiDoc): WorkRouterHandle {
  // fed by telemetry (startServer wires it); the routes only read it
  const history = openingHistoryOf(ctx);
  const svc = new WorkOrderService(ctx, history);
  const r = Router();
  const planners = requireRole('planner', 'admin');
  const tag = 'work orders';
  const gateShut = { 409: { description: 'the opening check is not clear (the unmet conditions), or lockout is not confirmed', schema: GateShut } };
  const gated = (fn: (req: Request, res: Response) => Promise<void>) => async (req: Request, res: Response) => {
    try {
      await fn(req, res);
    } catch (err) {
      if (err instanceof GateShutError) return void res.status(409).json(err.body);
      if (err instanceof AlreadyRecordedError) return void res.status(409).json({ error: err.message, coolantTest: err.coolantTest });
      throw err;
    }
  };
  for (const p of ['/work-orders', '/work-order-templates', '/attachments', '/engines/:id/opening-check']) r.use(p, requireAuth);
  // a change sent again with the same Idempotency-Key (the offline queue's retry) is done once
  r.use('/work-orders', idempotent(ctx));
  // a work order of a site the caller may not see reads as not found, whatever is done to it
  r.use('/work-orders/:id', async (req, _res, next) => {
    const id = Number(req.params.id);
    if (Number.isInteger(id) && id > 0) await assertWorkOrderVisible(ctx.models, await siteScopeOf(req), id);
    next();
  });

  route(doc, {
    method: 'get',
    path: '/work-order-templates',
    id: 'listWorkTemplates',
    tag,
    summary: 'Checklists each kind of work order starts from',
    access: 'signed-in',
    ok: z.array(WorkTemplate),
  });
  r.get('/work-order-templates', (_req, res) => {
    res.json(WORK_TEMPLATES);
  });

  route(doc, {
    method: 'get',
    path: '/engines/:id/opening-check',
    id: 'getOpeningCheck',
    tag,
    summary: 'May the cooling system be opened now? Stopped, cool, depressurised, fresh data, held; with a predicted clear time',
    access: 'signed-in',
    params: idParam,
    query: openingQuery,
    ok: OpeningCheck,
  });
  r.get('/engines/:id/opening-check', async (req, res) => {
    const id = parseId(req.params);
    await assertEngineVisible(ctx.models, await siteScopeOf(req), id);
    // lockout is the technician's confirmation on the step; shown here as not yet confirmed
    res.json(await openingCheckOf(ctx.models, history, id, req.query.lockoutConfirmed === 'true'));
  });

  route(doc, {
    method: 'get',
    path: '/work-orders/assignees',
    id: 'listAssignees',
    tag,
    summary: 'Active technicians a work order can be assigned to',
    access: 'signed-in',
    ok: z.array(Assignee),
  });
  r.get('/work-orders/assignees', async (req, res) => {
    // the picker follows the asker's sites: no names of people who work only elsewhere
    res.json(await svc.assignees(await visibleUserIds(ctx.models, await siteScopeOf(req))));
  });

  route(doc, {
    method: 'get',
    path: '/work-orders',
    id: 'listWorkOrders',
    tag,
    summary: 'Work orders',
    description: '`status`: comma-separated.',
    access: 'signed-in',
    query: listQuery,
    ok: listOrPage(WorkOrder),
  });
  r.get('/work-orders', async (req, res) => {
    const q = parse(listQuery, req.query);
    const engineIds = (await visibleEngineIds(ctx.models, await siteScopeOf(req))) ?? undefined;
    const filters = {
      status: q.status,
      engineId: q.engineId,
      engineIds,
      assigneeId: q.assigneeId,
      siteId: q.siteId,
      mine: q.mine === '1' || q.mine === 'true',
      q: q.q,
    };
    const page = pageOf(q);
    res.json(page ? await svc.listPage(req.user!, filters, page) : await svc.list(req.user!, filters));
  });

  route(doc, {
    method: 'post',
    path: '/work-orders',
    id: 'createWorkOrder',
    tag,
    summary: 'Create a work order',
    description: 'Planner/admin: planned; others: requested. With alarmId the alarm is linked and its data carried over.',
    access: 'signed-in',
    body: createBody,
    ok: WorkOrderDetail,
    status: 201,
    headers: idempotencyHeaders,
    errors: [403, 409, 422],
  });
  r.post('/work-orders', async (req, res) => {
    const body = parse(createBody, req.body);
    // another site's engine answers as an unknown one does
    if (!(await engineVisible(ctx.models, await siteScopeOf(req), body.engineId))) throw new HttpError(400, 'engine does not exist or is retired', 'engineId');
    const order = await svc.create(req.user!, body);
    res.status(201).json(await svc.detail(order.id));
  });

  route(doc, {
    method: 'get',
    path: '/work-orders/:id',
    id: 'getWorkOrder',
    tag,
    summary: 'One work order with steps, parts, attachments, history and amendments',
    access: 'signed-in',
    params: idParam,
    ok: WorkOrderDetail,
  });
  r.get('/work-orders/:id', async (req, res) => {
    res.json(await svc.detail(parseId(req.params)));
  });

  route(doc, {
    method: 'patch',
    path: '/work-orders/:id',
    id: 'planWorkOrder',
    tag,
    summary: 'Plan: assign, schedule, re-prioritise (not once waiting for sign-off or finished)',
    access: ['planner', 'admin'],
    params: idParam,
    body: planBody,
    ok: WorkOrderDetail,
    headers: idempotencyHeaders,
    errors: [409, 422],
  });
  r.patch('/work-orders/:id', planners, async (req, res) => {
    const id = parseId(req.params);
    await svc.plan(req.user!, id, parse(planBody, req.body));
    res.json(await svc.detail(id));
  });

  route(doc, {
    method: 'post',
    path: '/work-orders/:id/transition',
    id: 'transitionWorkOrder',
    tag,
    summary: 'Move to another status; allowed moves and roles are enforced, every move is in the history',
    access: 'signed-in',
    params: idParam,
    body: transitionBody,
    ok: WorkOrderDetail,
    headers: idempotencyHeaders,
    errors: [403, 409, 422],
  });
  r.post('/work-orders/:id/transition', async (req, res) => {
    const id = parseId(req.params);
    const body = parse(transitionBody, req.body);
    await svc.transition(req.user!, id, body.to, body.note);
    res.json(await svc.detail(id));
  });

  route(doc, {
    method: 'post',
    path: '/work-orders/:id/steps/:stepId/complete',
    id: 'completeWorkOrderStep',
    tag,
    summary: 'Do a step (assigned technician)',
    description:
      'Gated steps need lockout confirmation and a clear opening check, re-computed here; a manual check is accepted only when live data is stale or missing. A step that adds coolant waits for the step that takes the cap off.',
    access: 'signed-in',
    params: stepParams,
    body: completeBody,
    ok: WorkOrderDetail,
    headers: idempotencyHeaders,
    errors: [403, 409, 422],
    also: gateShut,
  });
  r.post(
    '/work-orders/:id/steps/:stepId/complete',
    gated(async (req, res) => {
      const p = parse(stepParams, req.params);
      await completeStep(svc, req.user!, p.id, p.stepId, parse(completeBody, req.body));
      res.json(await svc.detail(p.id));
    }),
  );

  // a draft: what is typed into a step, saved without completing it
  route(doc, {
    method: 'patch',
    path: '/work-orders/:id/steps/:stepId',
    id: 'saveWorkOrderStepDraft',
    tag,
    summary: 'Save a draft of a step without completing it (assigned technician); a locked gated step takes nothing',
    access: 'signed-in',
    params: stepParams,
    body: draftBody,
    bodyOptional: true,
    ok: WorkOrderDetail,
    headers: idempotencyHeaders,
    errors: [403, 409, 422],
    also: gateShut,
  });
  r.patch(
    '/work-orders/:id/steps/:stepId',
    gated(async (req, res) => {
      const p = parse(stepParams, req.params);
      await saveDraft(svc, req.user!, p.id, p.stepId, parse(draftBody, req.body ?? {}));
      res.json(await svc.detail(p.id));
    }),
  );

  route(doc, {
    method: 'post',
    path: '/work-orders/:id/coolant-test',
    id: 'recordWorkOrderCoolantTest',
    tag,
    summary: 'Record the coolant test of a coolant-test order from its steps, once, after the sampling step',
    description: 'A second attempt answers 409 with the recorded test; a correction is an amendment.',
    access: 'signed-in',
    params: idParam,
    body: orderTestBody,
    bodyOptional: true,
    ok: OrderCoolantTest,
    status: 201,
    headers: idempotencyHeaders,
    errors: [403, 409, 422],
    also: { 409: { description: 'already recorded (the recorded test), or the order is not ready for it', schema: AlreadyRecorded } },
  });
  r.post(
    '/work-orders/:id/coolant-test',
    gated(async (req, res) => {
      const id = parseId(req.params);
      const body = parse(orderTestBody, req.body ?? {});
      const test = await recordOrderCoolantTest(svc, req.user!, id, body.method);
      res.status(201).json({ coolantTest: test, order: await svc.detail(id) });
    }),
  );

  route(doc, {
    method: 'post',
    path: '/work-orders/:id/parts',
    id: 'addWorkOrderPart',
    tag,
    summary: 'Record a part or fluid (filters in pcs; coolant and additive in L or gal, stored in L)',
    access: 'signed-in',
    params: idParam,
    body: partBody,
    ok: WorkOrderDetail,
    status: 201,
    headers: idempotencyHeaders,
    errors: [403, 409, 422],
  });
  r.post('/work-orders/:id/parts', async (req, res) => {
    const id = parseId(req.params);
    await addPart(svc, req.user!, id, parse(partBody, req.body));
    res.status(201).json(await svc.detail(id));
  });

  route(doc, {
    method: 'post',
    path: '/work-orders/:id/amendments',
    id: 'addWorkOrderAmendment',
    tag,
    summary: 'Append an amendment to a closed or cancelled order (the record itself is never edited)',
    access: 'signed-in',
    params: idParam,
    body: amendmentBody,
    ok: WorkOrderDetail,
    status: 201,
    headers: idempotencyHeaders,
    errors: [403, 409, 422],
  });
  r.post('/work-orders/:id/amendments', async (req, res) => {
    const id = parseId(req.params);
    await addAmendment(svc, req.user!, id, parse(amendmentBody, req.body).text);
    res.status(201).json(await svc.detail(id));
  });

  route(doc, {
    method: 'post',
    path: '/work-orders/:id/attachments',
    id: 'addWorkOrderAttachment',
    tag,
    summary: 'Attach a photo (JPEG, PNG, WebP) or PDF, at most 8 MB, checked by content',
    access: 'signed-in',
    params: idParam,
    form: uploadForm,
    ok: Attachment,
    status: 201,
    headers: idempotencyHeaders,
    errors: [403, 409, 413, 415, 422],
  });
  r.post('/work-orders/:id/attachments', singleFile, async (req, res) => {
    const id = parseId(req.params);
    const fields = parse(uploadFields, req.body ?? {});
    const a = await addAttachment(svc, req.user!, id, req.file, fields.stepId ?? null);
    res
      .status(201)
      .json({ id: a.id, stepId: a.stepId, originalName: a.originalName, contentType: a.contentType, size: a.size, url: `/api/attachments/${a.id}` });
  });

  route(doc, {
    method: 'get',
    path: '/attachments/:id',
    id: 'getAttachment',
    tag,
    summary: 'The attached file',
    access: 'signed-in',
    params: idParam,
    ok: z.string().openapi({ format: 'binary' }),
    media: ['image/jpeg', 'image/png', 'image/webp', 'application/pdf'],
  });
  r.get('/attachments/:id', async (req, res) => {
    const id = parseId(req.params);
    await assertAttachmentVisible(ctx.models, await siteScopeOf(req), id);
    const { attachment, file } = await attachmentFile(svc, id);
    res.setHeader('Content-Type', attachment.contentType);
    res.setHeader('X-Content-Type-Options', 'nosniff');
    res.setHeader('Cache-Control', 'private, max-age=300');
    res.setHeader(
      'Content-Disposition',
      `${attachment.contentType === 'application/pdf' ? 'attachment' : 'inline'}; filename*=UTF-8''${encodeURIComponent(attachment.originalName)}`,
    );
    res.sendFile(file);
  });

  return { router: r, service: svc, history };
}

export function workOrdersRouter(ctx: AppContext, doc: ApiDoc): Router {
  return workOrdersRouterWithService(ctx, doc).router;
}

/** Response bodies of the work-order routes and the engine service history, as the handlers answer them. */
import { z } from 'zod';
import type { WorkOrderSummary as WorkOrderSummaryType } from '../../shared/api/work-view';
import type { OpeningSettings } from '../../shared/work/opening-check';
import { WORK_PRIORITIES, WORK_STATUSES } from '../models/work-order';
import type { EngineHistory as EngineHistoryType } from '../services/engine-history';
import type { openingCheckOf } from '../services/work-orders/gate';
import type { WorkOrderService } from '../services/work-orders/work-order-service';
import { WORK_KINDS, type WorkTemplate as WorkTemplateType } from '../services/work-templates';
import { covers } from './api-doc';
import { CoolantTest, RunHoursAdjustment } from './coolant-schemas';

const isoTime = z.string().openapi({ format: 'date-time' });
const isoOrNull = isoTime.nullable();
const id = z.number().int();
const idOrNull = id.nullable();
const strOrNull = z.string().nullable();
const anyRecord = z.record(z.string(), z.unknown());

const caution = z.object({ id: z.string(), title: z.string(), text: z.string() });

export const WorkTemplate = z
  .object({
    kind: z.enum(WORK_KINDS),
    title: z.string(),
    serviceTask: strOrNull,
    resetsConductivityBaseline: z.boolean(),
    steps: z.array(
      z.object({
        key: z.string(),
        title: z.string(),
        input: z.enum(['value', 'photo', 'confirmation']),
        unit: z.string().optional(),
        gated: z.boolean(),
        optional: z.boolean().optional(),
        detail: z.string().optional(),
        caution: z.string().optional(),
        range: z.tuple([z.number(), z.number()]).optional(),
        after: z.array(z.string()).readonly().optional().openapi({ description: 'keys of earlier steps that must be done first' }),
      }),
    ),
    cautions: z.array(caution),
  })
  .openapi('WorkTemplate');
covers<WorkTemplateType>()(WorkTemplate);

const condition = z.object({
  name: z.enum(['engine-stopped', 'coolant-temperature', 'coolant-pressure', 'telemetry-fresh', 'lockout-confirmed', 'held']),
  met: z.boolean(),
  value: z.union([z.number(), z.boolean()]).nullable(),
  limit: z.union([z.number(), z.boolean()]).nullable(),
  unit: z.string(),
  detail: z.string().optional(),
});
const settings = z.object({
  safeOpenTempC: z.number(),
  maxPressureKpa: z.number(),
  minStoppedS: z.number(),
  holdS: z.number(),
  staleAfterS: z.number(),
  heaterSetpointC: z.number().nullable(),
  ambientC: z.number().nullable(),
  runningRpm: z.number(),
});
covers<OpeningSettings>()(settings);

export const OpeningCheck = z
  .object({
    engineId: id,
    at: isoTime,
    clear: z.boolean(),
    conditions: z.array(condition),
    clearAt: z.number().nullable().openapi({ description: 'predicted clear time, ms since epoch' }),
    forecast: z.object({ at: z.number(), earliest: z.number(), latest: z.number().nullable(), ambientFitted: z.boolean() }).nullable(),
    reasons: z.array(z.string()),
    stale: z.boolean(),
    settings,
  })
  .openapi('OpeningCheck');
covers<Awaited<ReturnType<typeof openingCheckOf>>>()(OpeningCheck);

/** 409 of a gated step: the opening check is not clear (the unmet conditions), or lockout is not confirmed. */
export const GateShut = z
  .object({
    error: z.string(),
    conditions: z.array(condition),
    clearAt: z.number().nullable(),
    reasons: z.array(z.string()).optional(),
    stale: z.boolean().optional(),
  })
  .openapi('GateShut');

export const Assignee = z.object({ id, name: z.string(), email: z.string() });
covers<Awaited<ReturnType<WorkOrderService['assignees']>>[number]>()(Assignee);

const summaryFields = {
  id,
  engineId: id,
  engineName: strOrNull,
  siteId: idOrNull,
  siteName: strOrNull,
  kind: z.string(),
  kindTitle: z.string(),
  title: z.string(),
  description: strOrNull,
  priority: z.enum(WORK_PRIORITIES),
  dueDate: strOrNull.openapi({ description: 'YYYY-MM-DD' }),
  status: z.enum(WORK_STATUSES),
  assigneeId: idOrNull,
  assigneeName: strOrNull,
  createdBy: id,
  createdByName: strOrNull,
  requestedBy: idOrNull,
  requestedByName: strOrNull,
  signedOffBy: idOrNull,
  signedOffByName: strOrNull,
  alarmIds: z.array(id),
  stepsDone: z.number().int(),
  stepsTotal: z.number().int(),
  manualChecks: z.number().int(),
  createdAt: isoTime,
  updatedAt: isoTime,
  startedAt: isoOrNull,
  completedAt: isoOrNull,
  signedOffAt: isoOrNull,
  closedAt: isoOrNull,
};
export const WorkOrder = z.object(summaryFields).openapi('WorkOrder');
covers<WorkOrderSummaryType>()(WorkOrder);

const manualCheck = z.object({ gaugeKpa: z.number(), tempC: z.number(), minutesSinceStop: z.number(), checkedBy: z.string(), reason: z.string() });

export const WorkOrderDetail = z
  .object({
    ...summaryFields,
    coolantTestId: idOrNull,
    serviceTaskKey: strOrNull,
    coolantTest: CoolantTest.nullable(),
    cautions: z.array(caution),
    steps: z.array(
      z.object({
        id,
        position: z.number().int(),
        key: z.string(),
        title: z.string(),
        detail: strOrNull,
        input: z.enum(['value', 'photo', 'confirmation']),
        unit: strOrNull,
        optional: z.boolean(),
        gated: z.boolean(),
        caution: strOrNull,
        after: z.array(z.string()).readonly(),
        resultValue: z.number().nullable(),
        resultUnit: strOrNull,
        resultText: strOrNull,
        lockoutConfirmed: z.boolean().nullable(),
        gateSnapshot: anyRecord.nullable().openapi({ description: 'the opening check as it was when the step was done' }),
        manualCheck: manualCheck.nullable(),
        doneAt: isoOrNull,
        doneBy: idOrNull.optional(),
        doneByName: strOrNull,
      }),
    ),
    parts: z.array(
      z.object({
        id,
        kind: z.string(),
        description: strOrNull,
        quantity: z.number(),
        unit: z.string(),
        addedBy: id,
        addedByName: strOrNull,
        createdAt: isoTime,
      }),
    ),
    attachments: z.array(
      z.object({
        id,
        stepId: idOrNull,
        originalName: z.string(),
        contentType: z.string(),
        size: z.number().int(),
        uploadedBy: id,
        uploadedByName: strOrNull,
        createdAt: isoTime,
        url: z.string(),
      }),
    ),
    history: z.array(
      z.object({
        id,
        at: isoTime,
        userId: idOrNull,
        userName: strOrNull,
        event: z.string(),
        fromStatus: strOrNull,
        toStatus: strOrNull,
        note: strOrNull,
        details: anyRecord.nullable(),
      }),
    ),
    amendments: z.array(z.object({ id, text: z.string(), authorId: id, authorName: strOrNull, createdAt: isoTime })),
  })
  .openapi('WorkOrderDetail');
covers<Awaited<ReturnType<WorkOrderService['detail']>>>()(WorkOrderDetail);

export const OrderCoolantTest = z.object({ coolantTest: CoolantTest, order: WorkOrderDetail });
export const AlreadyRecorded = z.object({ error: z.string(), coolantTest: CoolantTest.nullable() });

export const Attachment = z.object({ id, stepId: idOrNull, originalName: z.string(), contentType: z.string(), size: z.number().int(), url: z.string() });

export const EngineHistory = z
  .object({
    engine: z.object({
      id,
      name: z.string(),
      siteId: id,
      siteName: strOrNull,
      duty: z.string(),
      capacityL: z.number(),
      coolantFamily: z.string(),
      glycolType: z.string(),
      glycolPercent: z.number(),
      runHours: z.number(),
      retiredAt: isoOrNull,
    }),
    generatedAt: isoTime,
    workOrders: z.array(
      WorkOrder.extend({
        at: isoTime.openapi({ description: 'closed, else completed, else started, else created: the sort key' }),
        doneByNames: z.array(z.string()),
        parts: z.array(z.object({ kind: z.string(), description: strOrNull, quantity: z.number(), unit: z.enum(['L', 'pcs']) })),
        manualCheckSteps: z.array(manualCheck.extend({ stepId: id, stepTitle: z.string(), doneAt: isoOrNull, doneByName: strOrNull })),
        resets: z.array(z.object({ event: z.string(), at: isoTime, note: strOrNull, details: anyRecord.nullable() })),
      }),
    ),
    coolantTests: z.array(CoolantTest),
    runHoursAdjustments: z.array(RunHoursAdjustment),
    serviceEvents: z.array(
      z.object({
        id,
        taskKey: z.string(),
        taskTitle: z.string(),
        doneAt: isoTime,
        runHours: z.number().nullable(),
        workOrderId: idOrNull,
        workOrderTitle: strOrNull,
      }),
    ),
  })
  .openapi('EngineHistory');
covers<EngineHistoryType>()(EngineHistory);

/**
 * An engine's service history: everything done to its cooling system, newest first, read from the
 * tables the work-order and coolant features already keep (nothing is stored here). One query per
 * table for the engine, then names in one more.
 */
import type { Models } from '../models';
import type { ManualCheck } from '../models/work-order-step';
import { listCoolantTests, type CoolantTestView } from './coolant/coolant-tests';
import { runHoursHistory } from './coolant/run-hours';
import { servicePlan } from './coolant/service-plan';
import { getEngine } from './engines';
import { namesFor, summaryView, type WorkOrderSummary } from './work-orders/views';
import type { HistoryEngine, HistoryPart, HistoryServiceEvent } from '../../shared/api/engine-history-view';

export type { HistoryEngine, HistoryPart, HistoryServiceEvent } from '../../shared/api/engine-history-view';

export interface HistoryManualCheck extends ManualCheck {
  stepId: number;
  stepTitle: string;
  doneAt: string | null;
  doneByName: string | null;
}

export interface HistoryWorkOrder extends WorkOrderSummary {
  /** The date the order is sorted by: closed, else completed, else started, else created. */
  at: string;
  /** Everyone who completed a step, in the order they first did. */
  doneByNames: string[];
  parts: HistoryPart[];
  /** Gated steps that went ahead on readings taken by hand instead of live data. */
  manualCheckSteps: HistoryManualCheck[];
  /** What completing the order reset besides the service plan (a new conductivity baseline, or why not). */
  resets: { event: string; at: string; note: string | null; details: Record<string, unknown> | null }[];
}

export interface EngineHistory {
  engine: HistoryEngine;
  generatedAt: string;
  workOrders: HistoryWorkOrder[];
  coolantTests: CoolantTestView[];
  runHoursAdjustments: Awaited<ReturnType<typeof runHoursHistory>>;
  serviceEvents: HistoryServiceEvent[];
}

const iso = (d: Date | null | undefined) => (d ? new Date(d).toISOString() : null);

/** The whole service history of one engine (404 when it does not exist; site access is the route's job). */
export async function engineHistory(models: Models, engineId: number, now = new Date()): Promise<EngineHistory> {
  const engine = await getEngine(models, engineId);
  const orders = await models.WorkOrder.findAll({ where: { engineId }, order: [['id', 'DESC']], limit: 2000 });
  const orderIds = orders.map((o) => o.id);
  const [site, names, steps, parts, links, resets, tests, runHours, events, plan] = await Promise.all([
    models.Site.findByPk(engine.siteId, { attributes: ['id', 'name'] }),
    namesFor(models, orders),
    orderIds.length ? models.WorkOrderStep.findAll({ where: { workOrderId: orderIds }, order: [['position', 'ASC']] }) : [],
    orderIds.length ? models.WorkOrderPart.findAll({ where: { workOrderId: orderIds }, order: [['id', 'ASC']] }) : [],
    orderIds.length ? models.WorkOrderAlarm.findAll({ where: { workOrderId: orderIds } }) : [],
    orderIds.length
      ? models.WorkOrderEvent.findAll({ where: { workOrderId: orderIds, event: ['baseline-reset', 'baseline-pending'] }, order: [['at', 'ASC']] })
      : [],
    listCoolantTests(models, engineId),
    runHoursHistory(models, engineId),
    models.ServiceEvent.findAll({
      where: { engineId },
      order: [
        ['doneAt', 'DESC'],
        ['id', 'DESC'],
      ],
      limit: 2000,
    }),
    servicePlan(models, engine),
  ]);

  const stepUsers = [...new Set(steps.map((s) => s.doneBy).filter((x): x is number => !!x))].filter((id) => !names.users.has(id));
  if (stepUsers.length) for (const u of await models.User.findAll({ where: { id: stepUsers }, attributes: ['id', 'name'] })) names.users.set(u.id, u.name);
  const userName = (id: number | null | undefined) => (id ? (names.users.get(id) ?? null) : null);

  const byOrder = new Map(
    orderIds.map((id) => [
      id,
      {
        alarmIds: [] as number[],
        stepsDone: 0,
        stepsTotal: 0,
        manualChecks: 0,
        doneBy: [] as string[],
        parts: [] as HistoryPart[],
        manual: [] as HistoryManualCheck[],
        resets: [] as HistoryWorkOrder['resets'],
      },
    ]),
  );
  for (const s of steps) {
    const a = byOrder.get(s.workOrderId)!;
    a.stepsTotal++;
    if (s.doneAt) a.stepsDone++;
    const who = userName(s.doneBy);
    if (who && !a.doneBy.includes(who)) a.doneBy.push(who);
    if (s.manualCheck) {
      a.manualChecks++;
      a.manual.push({ ...s.manualCheck, stepId: s.id, stepTitle: s.title, doneAt: iso(s.doneAt), doneByName: who });
    }
  }
  for (const p of parts) byOrder.get(p.workOrderId)!.parts.push({ kind: p.kind, description: p.description, quantity: p.quantity, unit: p.unit });
  for (const l of links) byOrder.get(l.workOrderId)!.alarmIds.push(l.alarmId);
  for (const e of resets) byOrder.get(e.workOrderId)!.resets.push({ event: e.event, at: iso(e.at)!, note: e.note ?? null, details: e.details ?? null });

  const workOrders: HistoryWorkOrder[] = orders.map((o) => {
    const a = byOrder.get(o.id)!;
    const at = iso(o.closedAt ?? o.completedAt ?? o.startedAt ?? o.createdAt)!;
    return { ...summaryView(o, names, a), at, doneByNames: a.doneBy, parts: a.parts, manualCheckSteps: a.manual, resets: a.resets };
  });
  workOrders.sort((x, y) => (x.at < y.at ? 1 : x.at > y.at ? -1 : y.id - x.id));

  const titles = new Map(plan.map((t) => [t.key, t.title]));
  const orderTitle = new Map(orders.map((o) => [o.id, o.title]));
  const serviceEvents = events.map((e) => ({
    id: e.id,
    taskKey: e.taskKey,
    taskTitle: titles.get(e.taskKey) ?? e.taskKey,
    doneAt: iso(e.doneAt)!,
    runHours: e.runHours,
    workOrderId: e.workOrderId,
    workOrderTitle: e.workOrderId ? (orderTitle.get(e.workOrderId) ?? null) : null,
  }));

  return {
    engine: {
      id: engine.id,
      name: engine.name,
      siteId: engine.siteId,
      siteName: site?.name ?? null,
      duty: engine.duty,
      capacityL: engine.capacityL,
      coolantFamily: engine.coolantFamily,
      glycolType: engine.glycolType,
      glycolPercent: engine.glycolPercent,
      runHours: engine.runHours,
      retiredAt: iso(engine.retiredAt),
    },
    generatedAt: now.toISOString(),
    workOrders,
    coolantTests: tests,
    runHoursAdjustments: runHours,
    serviceEvents,
  };
}

import type { Models } from '../../models';
import type { WorkOrder } from '../../models/work-order';
import { workTemplate } from '../work-templates';
import type { WorkOrderSummary } from '../../../shared/api/work-view';

export interface Names {
  users: Map<number, string>;
  engines: Map<number, { name: string; siteId: number }>;
  sites: Map<number, string>;
}

/** Names of the users, engines and sites the given orders mention, in three queries. */
export async function namesFor(models: Models, orders: WorkOrder[]): Promise<Names> {
  const userIds = new Set<number>();
  const engineIds = new Set<number>();
  for (const o of orders) {
    for (const id of [o.assigneeId, o.createdBy, o.requestedBy, o.signedOffBy]) if (id) userIds.add(id);
    engineIds.add(o.engineId);
  }
  const [users, engines] = await Promise.all([
    userIds.size ? models.User.findAll({ where: { id: [...userIds] }, attributes: ['id', 'name'] }) : [],
    engineIds.size ? models.Engine.findAll({ where: { id: [...engineIds] }, attributes: ['id', 'name', 'siteId'] }) : [],
  ]);
  const siteIds = [...new Set(engines.map((e) => e.siteId))];
  const sites = siteIds.length ? await models.Site.findAll({ where: { id: siteIds }, attributes: ['id', 'name'] }) : [];
  return {
    users: new Map(users.map((u) => [u.id, u.name])),
    engines: new Map(engines.map((e) => [e.id, { name: e.name, siteId: e.siteId }])),
    sites: new Map(sites.map((s) => [s.id, s.name])),
  };
}

export type { WorkOrderSummary } from '../../../shared/api/work-view';

const iso = (d: Date | null | undefined) => (d ? new Date(d).toISOString() : null);

export function summaryView(
  o: WorkOrder,
  names: Names,
  extra: { alarmIds: number[]; stepsDone: number; stepsTotal: number; manualChecks: number },
): WorkOrderSummary {
  const engine = names.engines.get(o.engineId);
  const user = (id: number | null) => (id ? (names.users.get(id) ?? null) : null);
  return {
    id: o.id,
    engineId: o.engineId,
    engineName: engine?.name ?? null,
    siteId: engine?.siteId ?? null,
    siteName: engine ? (names.sites.get(engine.siteId) ?? null) : null,
    kind: o.kind,
    kindTitle: workTemplate(o.kind)?.title ?? o.kind,
    title: o.title,
    description: o.description,
    priority: o.priority,
    dueDate: o.dueDate,
    status: o.status,
    assigneeId: o.assigneeId,
    assigneeName: user(o.assigneeId),
    createdBy: o.createdBy,
    createdByName: user(o.createdBy),
    requestedBy: o.requestedBy,
    requestedByName: user(o.requestedBy),
    signedOffBy: o.signedOffBy ?? null,
    signedOffByName: user(o.signedOffBy ?? null),
    alarmIds: extra.alarmIds,
    stepsDone: extra.stepsDone,
    stepsTotal: extra.stepsTotal,
    manualChecks: extra.manualChecks,
    createdAt: iso(o.createdAt)!,
    updatedAt: iso(o.updatedAt)!,
    startedAt: iso(o.startedAt),
    completedAt: iso(o.completedAt),
    signedOffAt: iso(o.signedOffAt),
    closedAt: iso(o.closedAt),
  };
}

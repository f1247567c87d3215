import { Op } from 'sequelize';
import { defaultServicePlan, dueList, type DueState, type ServiceTask, type TaskRecord } from '../../../shared/service/due-list';
import { badRequest } from '../../http-error';
import type { Engine, Models } from '../../models';
import { getEngine } from '../engines';
import { getChemistryLimits } from './chemistry-limits';
import { WORK_KINDS, workTemplate, type WorkKind } from '../work-templates';

/**
 * One name per task: a plan task whose key is a work-order kind is done by that kind's template (one click on
 * the due list creates it), and completing the work order writes a service event under the same key.
 */
export function workKindFor(taskKey: string): WorkKind | null {
  const kind = (WORK_KINDS as readonly string[]).includes(taskKey) ? (taskKey as WorkKind) : null;
  return kind && workTemplate(kind)?.serviceTask === taskKey ? kind : null;
}

/** The kind of work for a due task: its own template, else a general repair (a task this engine's plan added). */
export function workKindForTask(taskKey: string): WorkKind {
  return workKindFor(taskKey) ?? 'general-repair';
}

export interface PlanTask extends ServiceTask {
  /** True when this engine's plan changes the default for this task (or adds it). */
  overridden: boolean;
  workKind: WorkKind;
}

export interface OverrideInput {
  title?: string | null;
  everyHours?: number | null;
  everyDays?: number | null;
  disabled?: boolean;
}

/** The engine's plan: the default plan with this engine's overrides applied; disabled tasks left out. */
export async function servicePlan(models: Models, engine: Engine): Promise<PlanTask[]> {
  const overrides = await models.ServiceTaskOverride.findAll({ where: { engineId: engine.id } });
  const byKey = new Map(overrides.map((o) => [o.taskKey, o]));
  const tasks: PlanTask[] = [];
  for (const t of defaultServicePlan(await planEngine(models, engine))) {
    const o = byKey.get(t.key);
    byKey.delete(t.key);
    if (o?.disabled) continue;
    tasks.push({
      ...t,
      title: o?.title ?? t.title,
      everyHours: o && o.everyHours !== null ? o.everyHours : t.everyHours,
      everyDays: o && o.everyDays !== null ? o.everyDays : t.everyDays,
      placeholder: o && (o.everyHours !== null || o.everyDays !== null) ? false : t.placeholder,
      basis: o && (o.everyHours !== null || o.everyDays !== null) ? 'set for this engine' : t.basis,
      overridden: !!o,
      workKind: workKindForTask(t.key),
    });
  }
  for (const o of byKey.values()) {
    if (o.disabled || (!o.everyHours && !o.everyDays)) continue;
    tasks.push({
      key: o.taskKey,
      title: o.title ?? o.taskKey,
      everyHours: o.everyHours,
      everyDays: o.everyDays,
      basis: 'set for this engine',
      overridden: true,
      workKind: workKindForTask(o.taskKey),
    });
  }
  return tasks;
}

/** What the default plan needs of an engine, with the administrator's extender interval for extended-life coolant. */
async function planEngine(models: Models, engine: Engine) {
  const extender = engine.coolantFamily === 'extended-life' ? (await getChemistryLimits(models)).extender : null;
  return { oilDrainIntervalH: engine.oilDrainIntervalH, duty: engine.duty, coolantFamily: engine.coolantFamily, extender };
}

export async function enginePlan(models: Models, engineId: number): Promise<PlanTask[]> {
  return servicePlan(models, await getEngine(models, engineId));
}

export async function setOverride(models: Models, engineId: number, taskKey: string, input: OverrideInput, userId: number): Promise<PlanTask[]> {
  const engine = await getEngine(models, engineId);
  const known = defaultServicePlan(await planEngine(models, engine)).some((t) => t.key === taskKey);
  const existing = await models.ServiceTaskOverride.findOne({ where: { engineId, taskKey } });
  if (!known && !existing && !input.title) throw badRequest('a task of its own needs a title', 'title');
  const values = {
    title: input.title ?? existing?.title ?? null,
    everyHours: input.everyHours !== undefined ? input.everyHours : (existing?.everyHours ?? null),
    everyDays: input.everyDays !== undefined ? input.everyDays : (existing?.everyDays ?? null),
    disabled: input.disabled ?? existing?.disabled ?? false,
    updatedBy: userId,
  };
  if (!known && !values.disabled && !values.everyHours && !values.everyDays)
    throw badRequest('a task of its own needs an interval in hours or days', 'everyHours');
  if (existing) await existing.update(values);
  else await models.ServiceTaskOverride.create({ engineId, taskKey, ...values });
  return servicePlan(models, engine);
}

/** Back to the default for this task. */
export async function clearOverride(models: Models, engineId: number, taskKey: string): Promise<PlanTask[]> {
  const engine = await getEngine(models, engineId);
  await models.ServiceTaskOverride.destroy({ where: { engineId, taskKey } });
  return servicePlan(models, engine);
}

export interface DueEntryView {
  engineId: number;
  engineName: string;
  runHours: number;
  taskKey: string;
  title: string;
  state: DueState;
  reason: string;
  dueAt: string | null;
  dueAtRunHours: number | null;
  lastDoneAt: string | null;
  lastDoneRunHours: number | null;
  everyHours: number | null;
  everyDays: number | null;
  placeholder: boolean;
  basis: string;
  /** The kind of work order that does this task (every task has one). */
  workKind: WorkKind;
  /** An open work order of that kind on this engine, so the planner does not create a second one. */
  openWorkOrderId: number | null;
}

export interface DueSiteView {
  siteId: number;
  siteName: string;
  timeZone: string;
  overdue: number;
  dueSoon: number;
  entries: DueEntryView[];
}

export interface DueListQuery {
  siteId?: number;
  /** The caller's visible sites (already narrowed to siteId when one is asked for). */
  siteIds?: number[];
  engineId?: number;
  windowDays: number;
  windowHours?: number;
  /** Also list the tasks that are not due. */
  includeOk?: boolean;
  now: number;
}

const OPEN_STATUSES_EXCLUDED = ['closed', 'cancelled'];

/** Last time each task was done on each engine: service events (written when a work order completes) and, for the coolant test, recorded tests. */
async function lastDone(models: Models, engineIds: number[], now: number): Promise<Map<number, Map<string, TaskRecord>>> {
  const out = new Map<number, Map<string, TaskRecord>>();
  const put = (engineId: number, key: string, at: number, runHours: number | null) => {
    let m = out.get(engineId);
    if (!m) out.set(engineId, (m = new Map()));
    const prev = m.get(key);
    if (!prev || (prev.lastDoneAt ?? -Infinity) < at) m.set(key, { lastDoneAt: at, lastDoneRunHours: runHours });
  };
  if (!engineIds.length) return out;
  const cutoff = new Date(now);
  const events = await models.ServiceEvent.findAll({ where: { engineId: engineIds, doneAt: { [Op.lte]: cutoff } }, order: [['doneAt', 'ASC']] });
  for (const e of events) {
    put(e.engineId, e.taskKey, new Date(e.doneAt).getTime(), e.runHours);
    // fresh extended-life coolant needs no extender until its interval has run from the refill
    if (e.taskKey === 'drain-flush-refill') put(e.engineId, 'coolant-extender', new Date(e.doneAt).getTime(), e.runHours);
  }
  const tests = await models.CoolantTest.findAll({
    where: { engineId: engineIds, testedAt: { [Op.lte]: cutoff } },
    attributes: ['engineId', 'testedAt'],
    order: [['testedAt', 'ASC']],
  });
  // a recorded test has no hour-meter reading with it: calendar only, unless a service event says more
  for (const t of tests) {
    const m = out.get(t.engineId)?.get('coolant-test');
    const at = new Date(t.testedAt).getTime();
    if (!m || (m.lastDoneAt ?? -Infinity) < at) put(t.engineId, 'coolant-test', at, m?.lastDoneRunHours ?? null);
  }
  return out;
}

/** The planner's due list on a given clock: overdue and due soon per site, with when each task was last done. */
export async function computeDueList(models: Models, q: DueListQuery): Promise<{ now: string; windowDays: number; windowHours: number; sites: DueSiteView[] }> {
  const windowHours = q.windowHours ?? 50;
  const where: Record<string, unknown> = { retiredAt: null, outOfService: false };
  if (q.siteIds !== undefined) where.siteId = q.siteIds;
  else if (q.siteId !== undefined) where.siteId = q.siteId;
  if (q.engineId !== undefined) where.id = q.engineId;
  const engines = await models.Engine.findAll({
    where,
    order: [
      ['siteId', 'ASC'],
      ['name', 'ASC'],
    ],
  });
  const sites = new Map((await models.Site.findAll({ where: { id: [...new Set(engines.map((e) => e.siteId))] } })).map((s) => [s.id, s]));
  const records = await lastDone(
    models,
    engines.map((e) => e.id),
    q.now,
  );
  const open = await models.WorkOrder.findAll({
    where: { engineId: engines.map((e) => e.id), status: { [Op.notIn]: OPEN_STATUSES_EXCLUDED } },
    attributes: ['id', 'engineId', 'kind', 'serviceTaskKey'],
    order: [['id', 'ASC']],
  });
  // an open order for a task: the one created for it, or (for a task with its own template) one of its kind;
  // a general repair counts only for the task it was created for
  const openByTask = new Map(open.filter((w) => w.serviceTaskKey).map((w) => [`${w.engineId}:${w.serviceTaskKey}`, w.id]));
  const openBy = new Map(open.filter((w) => w.kind !== 'general-repair').map((w) => [`${w.engineId}:${w.kind}`, w.id]));

  const out = new Map<number, DueSiteView>();
  for (const engine of engines) {
    const site = sites.get(engine.siteId);
    if (!site || site.retiredAt) continue;
    const plan = await servicePlan(models, engine);
    const rec = records.get(engine.id) ?? new Map<string, TaskRecord>();
    const taskRecords: Record<string, TaskRecord | undefined> = {};
    for (const t of plan) taskRecords[t.key] = rec.get(t.key);
    const list = dueList(plan, taskRecords, { runHoursNow: engine.runHours, now: q.now }, q.windowDays, windowHours);
    let view = out.get(site.id);
    if (!view) out.set(site.id, (view = { siteId: site.id, siteName: site.name, timeZone: site.timeZone, overdue: 0, dueSoon: 0, entries: [] }));
    for (const e of list) {
      if (e.state === 'overdue') view.overdue++;
      if (e.state === 'due-soon') view.dueSoon++;
      if (e.state === 'ok' && !q.includeOk) continue;
      const t = e.task as PlanTask;
      const r = taskRecords[t.key];
      view.entries.push({
        engineId: engine.id,
        engineName: engine.name,
        runHours: engine.runHours,
        taskKey: t.key,
        title: t.title,
        state: e.state,
        reason: e.reason,
        dueAt: e.dueAt === null ? null : new Date(e.dueAt).toISOString(),
        dueAtRunHours: e.dueAtRunHours,
        lastDoneAt: r?.lastDoneAt ? new Date(r.lastDoneAt).toISOString() : null,
        lastDoneRunHours: r?.lastDoneRunHours ?? null,
        everyHours: t.everyHours ?? null,
        everyDays: t.everyDays ?? null,
        placeholder: !!t.placeholder,
        basis: t.basis,
        workKind: t.workKind,
        openWorkOrderId: openByTask.get(`${engine.id}:${t.key}`) ?? openBy.get(`${engine.id}:${t.workKind}`) ?? null,
      });
    }
  }
  const rank: Record<DueState, number> = { overdue: 0, 'due-soon': 1, ok: 2 };
  for (const v of out.values()) {
    v.entries.sort((a, b) => rank[a.state] - rank[b.state] || (a.dueAt ?? '9').localeCompare(b.dueAt ?? '9') || a.engineName.localeCompare(b.engineName));
  }
  return {
    now: new Date(q.now).toISOString(),
    windowDays: q.windowDays,
    windowHours,
    sites: [...out.values()].sort((a, b) => a.siteName.localeCompare(b.siteName)),
  };
}

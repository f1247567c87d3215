import { col, fn, Op, QueryTypes } from 'sequelize';
import { defaultServicePlan, dueList, type DueState, type ServiceTask, type TaskRecord } from '../../../shared/service/due-list';
import { badRequest } from '../../http-error';
import type { Engine, Models } from '../../models';
import type { ServiceTaskOverride } from '../../models/coolant-models';
import { engineIdsMatching, type Page, type PageRequest } from '../list-page';
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
  return planOf(await planEngine(models, engine), overrides);
}

type OverrideRow = Pick<ServiceTaskOverride, 'taskKey' | 'title' | 'everyHours' | 'everyDays' | 'disabled'>;

/** The plan from the engine's facts and its overrides, with no I/O (the due list loads both for every engine at once). */
function planOf(facts: Awaited<ReturnType<typeof planEngine>>, overrides: OverrideRow[]): PlanTask[] {
  const byKey = new Map(overrides.map((o) => [o.taskKey, o]));
  const tasks: PlanTask[] = [];
  for (const t of defaultServicePlan(facts)) {
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
  return planFacts(engine, extender);
}

function planFacts(engine: Pick<Engine, 'oilDrainIntervalH' | 'duty' | 'coolantFamily'>, extender: ExtenderSetting) {
  return {
    oilDrainIntervalH: engine.oilDrainIntervalH,
    duty: engine.duty,
    coolantFamily: engine.coolantFamily,
    extender: engine.coolantFamily === 'extended-life' ? extender : null,
  };
}
type ExtenderSetting = Awaited<ReturnType<typeof getChemistryLimits>>['extender'];

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
  /** Text in the engine's name or its site's name (case-insensitive). */
  q?: string;
  now: number;
}

const OPEN_STATUSES_EXCLUDED = ['closed', 'cancelled'];

/** A date column read with `raw: true`: a Date (PostgreSQL) or SQLite's text `2026-06-01 12:00:00.000 +00:00`. */
function dateMs(v: unknown): number {
  if (v instanceof Date) return v.getTime();
  const s = String(v);
  const t = Date.parse(s);
  return Number.isNaN(t) ? Date.parse(s.replace(' ', 'T').replace(' ', '')) : t;
}

/**
 * Last time each task was done on each engine: service events (written when a work order completes) and, for the
 * coolant test, recorded tests. Plain rows (`raw`), the latest test per engine by GROUP BY: the due list reads
 * this for every engine of the fleet on each request.
 */
async function lastDone(models: Models, engineIds: number[] | null, now: number): Promise<Map<number, Map<string, TaskRecord>>> {
  const out = new Map<number, Map<string, TaskRecord>>();
  const put = (engineId: number, key: string, at: number, runHours: number | null) => {
    let m = out.get(engineId);
    if (!m) out.set(engineId, (m = new Map()));
    const prev = m.get(key);
    if (!prev || (prev.lastDoneAt ?? -Infinity) < at) m.set(key, { lastDoneAt: at, lastDoneRunHours: runHours });
  };
  if (engineIds?.length === 0) return out;
  const cutoff = new Date(now);
  const of = engineIds ? { engineId: engineIds } : {};
  const sequelize = models.ServiceEvent.sequelize!;
  const cutoffSql = sequelize.escape(cutoff);
  const [events, tests] = await Promise.all([
    // the latest event of each task of each engine (the index on engine_id, task_key, done_at answers the GROUP
    // BY); years of weekly inspections stay in the table, not in memory
    sequelize.query<{ engineId: number; taskKey: string; doneAt: unknown; runHours: number | null }>(
      `SELECT e.engine_id AS "engineId", e.task_key AS "taskKey", e.done_at AS "doneAt", e.run_hours AS "runHours"
         FROM service_events e
         JOIN (SELECT engine_id, task_key, MAX(done_at) AS last_at FROM service_events
                WHERE done_at <= ${cutoffSql}${engineIds ? ' AND engine_id IN (:ids)' : ''}
                GROUP BY engine_id, task_key) m
           ON m.engine_id = e.engine_id AND m.task_key = e.task_key AND m.last_at = e.done_at
        ORDER BY e.id`,
      { type: QueryTypes.SELECT, replacements: engineIds ? { ids: engineIds } : {} },
    ),
    models.CoolantTest.findAll({
      where: { ...of, testedAt: { [Op.lte]: cutoff } },
      attributes: ['engineId', [fn('max', col('tested_at')), 'testedAt']],
      group: ['engineId'],
      raw: true,
    }),
  ]);
  for (const e of events) {
    const at = dateMs(e.doneAt);
    put(e.engineId, e.taskKey, at, e.runHours);
    // fresh extended-life coolant needs no extender until its interval has run from the refill
    if (e.taskKey === 'drain-flush-refill') put(e.engineId, 'coolant-extender', at, e.runHours);
  }
  // a recorded test has no hour-meter reading with it: calendar only, unless a service event says more
  for (const t of tests) {
    const m = out.get(t.engineId)?.get('coolant-test');
    const at = dateMs(t.testedAt);
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
  if (q.q !== undefined) {
    const ids = await engineIdsMatching(models, models.Engine.sequelize!, q.q);
    where.id = q.engineId === undefined ? ids : ids.filter((id) => id === q.engineId);
  } else if (q.engineId !== undefined) where.id = q.engineId;
  const engines = await models.Engine.findAll({
    where,
    attributes: ['id', 'siteId', 'name', 'runHours', 'oilDrainIntervalH', 'duty', 'coolantFamily'],
    order: [
      ['siteId', 'ASC'],
      ['name', 'ASC'],
      ['id', 'ASC'],
    ],
    raw: true,
  });
  // the whole fleet asked for: read the other tables whole (rows of engines not listed are skipped) rather
  // than send thousands of ids in an IN list
  const narrowed = q.siteIds !== undefined || q.siteId !== undefined || q.engineId !== undefined || q.q !== undefined;
  const ids = narrowed ? engines.map((e) => e.id) : null;
  const ofEngines = ids ? { engineId: ids } : {};
  // every engine's overrides and the extender setting at once (not one query per engine)
  const [overrideRows, limits] = await Promise.all([
    engines.length ? models.ServiceTaskOverride.findAll({ where: ofEngines }) : [],
    getChemistryLimits(models),
  ]);
  const overridesOf = new Map<number, ServiceTaskOverride[]>();
  for (const o of overrideRows) {
    const list = overridesOf.get(o.engineId);
    if (list) list.push(o);
    else overridesOf.set(o.engineId, [o]);
  }
  const sites = new Map((await models.Site.findAll({ where: { id: [...new Set(engines.map((e) => e.siteId))] } })).map((s) => [s.id, s]));
  const records = await lastDone(models, ids, q.now);
  const open = await models.WorkOrder.findAll({
    where: { ...ofEngines, status: { [Op.notIn]: OPEN_STATUSES_EXCLUDED } },
    attributes: ['id', 'engineId', 'kind', 'serviceTaskKey'],
    order: [['id', 'ASC']],
    raw: true,
  });
  // an open order for a task: the one created for it, or (for a task with its own template) one of its kind;
  // a general repair counts only for the task it was created for
  const openByTask = new Map(open.filter((w) => w.serviceTaskKey).map((w) => [`${w.engineId}:${w.serviceTaskKey}`, w.id]));
  const openBy = new Map(open.filter((w) => w.kind !== 'general-repair').map((w) => [`${w.engineId}:${w.kind}`, w.id]));

  const out = new Map<number, DueSiteView>();
  const sharedPlans = new Map<string, PlanTask[]>();
  for (const engine of engines) {
    const site = sites.get(engine.siteId);
    if (!site || site.retiredAt) continue;
    const own = overridesOf.get(engine.id);
    const facts = planFacts(engine, limits.extender);
    // engines with no overrides share their plan with every engine of the same duty, oil interval and coolant
    const shared = `${facts.duty}|${facts.oilDrainIntervalH}|${facts.coolantFamily}`;
    let plan = own ? null : sharedPlans.get(shared);
    if (!plan) {
      plan = planOf(facts, own ?? []);
      if (!own) sharedPlans.set(shared, plan);
    }
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
    // engine id and task key last: a total order, so pages never repeat or skip an entry
    v.entries.sort(
      (a, b) =>
        rank[a.state] - rank[b.state] ||
        cmp(a.dueAt ?? '9', b.dueAt ?? '9') ||
        a.engineName.localeCompare(b.engineName) ||
        a.engineId - b.engineId ||
        a.taskKey.localeCompare(b.taskKey),
    );
  }
  return {
    now: new Date(q.now).toISOString(),
    windowDays: q.windowDays,
    windowHours,
    sites: [...out.values()].sort((a, b) => a.siteName.localeCompare(b.siteName) || a.siteId - b.siteId),
  };
}

/** Plain order of ISO instants (localeCompare is slow over thousands of entries and needs no locale here). */
const cmp = (a: string, b: string) => (a < b ? -1 : a > b ? 1 : 0);

export type DueList = Awaited<ReturnType<typeof computeDueList>>;
export interface DueSitePageView extends DueSiteView {
  /** The site's entries over all pages (entries holds only this page's). */
  entryTotal: number;
}

/**
 * One page of the due list: the entries in the list's order (site by name, then overdue, due soon, by due
 * date), grouped by site as the whole list is, each site with its counts over all pages. A site with nothing
 * listed comes with the page where its place in the order falls (the last page when it sorts last).
 */
export function dueListPage(list: DueList, page: PageRequest): Omit<DueList, 'sites'> & Omit<Page<never>, 'items'> & { sites: DueSitePageView[] } {
  const total = list.sites.reduce((n, s) => n + s.entries.length, 0);
  const end = page.offset + page.limit;
  const sites: DueSitePageView[] = [];
  const lastPage = total === 0 ? page.offset === 0 : page.offset < total && total <= end;
  let at = 0;
  for (const s of list.sites) {
    const entries = s.entries.slice(Math.max(0, page.offset - at), Math.max(0, end - at));
    const emptyHere = s.entries.length === 0 && (at < total ? at >= page.offset && at < end : lastPage);
    if (entries.length || emptyHere) sites.push({ ...s, entries, entryTotal: s.entries.length });
    at += s.entries.length;
  }
  return { now: list.now, windowDays: list.windowDays, windowHours: list.windowHours, sites, total, limit: page.limit, offset: page.offset };
}

/**
 * What the due list is computed from, in one cheap query: counts, the newest change and the run hours of the tables
 * it reads. Any write that could change an entry changes this (a new or changed work order, service event, coolant
 * test, plan override, engine, run hours, the extender setting, a site added or retired).
 */
async function dueListFingerprint(models: Models): Promise<string> {
  const rows = await models.Engine.sequelize!.query(
    `SELECT (SELECT COUNT(*) FROM engines) AS ec, (SELECT MAX(updated_at) FROM engines) AS eu, (SELECT SUM(run_hours) FROM engines) AS er,
            (SELECT COUNT(*) FROM work_orders) AS wc, (SELECT MAX(updated_at) FROM work_orders) AS wu,
            (SELECT COUNT(*) FROM service_events) AS sc, (SELECT MAX(id) FROM service_events) AS si,
            (SELECT COUNT(*) FROM coolant_tests) AS cc, (SELECT MAX(id) FROM coolant_tests) AS ci,
            (SELECT COUNT(*) FROM service_tasks) AS tc, (SELECT MAX(updated_at) FROM service_tasks) AS tu,
            (SELECT MAX(updated_at) FROM coolant_settings) AS su,
            (SELECT COUNT(*) FROM sites) AS stc, (SELECT COUNT(*) FROM sites WHERE retired_at IS NULL) AS sta`,
    { type: QueryTypes.SELECT },
  );
  return JSON.stringify(rows[0]);
}

/** A computed list stays valid while nothing it reads changed, for at most this long (due states move with the clock). */
export const DUE_CACHE_MS = 60_000;
const DUE_CACHE_ENTRIES = 32;
const dueCaches = new WeakMap<Models, Map<string, { at: number; fingerprint: string; list: DueList }>>();

/**
 * The due list for the route: computed for the whole filtered fleet (its rows are computed, not stored), kept per
 * query and scope while the fingerprint of what it reads is unchanged and for at most DUE_CACHE_MS, so paging
 * through it or opening it again does not compute it again. (A site renamed shows its new name within that time.)
 */
export async function dueListFor(models: Models, q: DueListQuery): Promise<DueList> {
  let cache = dueCaches.get(models);
  if (!cache) dueCaches.set(models, (cache = new Map()));
  const key = JSON.stringify({ ...q, now: undefined, siteIds: q.siteIds ? [...q.siteIds].sort((a, b) => a - b) : null });
  const fingerprint = await dueListFingerprint(models);
  const hit = cache.get(key);
  if (hit && hit.fingerprint === fingerprint && q.now >= hit.at && q.now - hit.at < DUE_CACHE_MS) return hit.list;
  const list = await computeDueList(models, q);
  cache.delete(key);
  cache.set(key, { at: q.now, fingerprint, list });
  if (cache.size > DUE_CACHE_ENTRIES) cache.delete(cache.keys().next().value!);
  return list;
}

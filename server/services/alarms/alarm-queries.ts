/** Reading alarms: lists, one alarm with its history, the summary with flood state, counts per engine. */
import { Op } from 'sequelize';
import { isAnnunciated, type AlarmState } from '../../../shared/alarms/alarm-state';
import { floodPeriods, ISA_18_2_FLOOD } from '../../../shared/alarms/flood';
import type { AlarmHistoryPage, AlarmHistoryView, AlarmView } from '../../../shared/api/alarms-view';
import { notFound } from '../../http-error';
import type { Models } from '../../models';
import type { Alarm } from '../../models/alarm';
import { iso } from './alarm-view';

export type ListState = 'active' | 'shelved' | 'open' | 'all';

export const ANNUNCIATED: AlarmState[] = ['unacknowledged', 'acknowledged', 'returned-unacknowledged'];

export async function findAlarm(models: Models, id: number): Promise<Alarm> {
  const a = await models.Alarm.findByPk(id);
  if (!a) throw notFound('alarm');
  return a;
}

export interface AlarmListQuery {
  state: ListState;
  engineId?: number;
  /** The caller's visible engines (undefined: all). */
  engineIds?: number[];
  /** Engines whose name or site name holds the text filter (undefined: no text filter). */
  textEngineIds?: number[];
  priority?: string;
  /** One state within the chosen set. */
  alarmState?: AlarmState;
  limit?: number;
  offset?: number;
}

function alarmWhere(q: AlarmListQuery): Record<string | symbol, unknown> {
  const where: Record<string | symbol, unknown> = {};
  const sets: number[][] = [];
  if (q.engineIds !== undefined) sets.push(q.engineIds);
  if (q.textEngineIds !== undefined) sets.push(q.textEngineIds);
  if (q.engineId !== undefined) sets.push([q.engineId]);
  if (sets.length) where.engineId = sets.reduce((acc, s) => acc.filter((id) => s.includes(id)));
  if (q.state === 'active') Object.assign(where, { closedAt: null, state: ANNUNCIATED });
  else if (q.state === 'shelved') Object.assign(where, { closedAt: null, state: 'shelved' });
  else if (q.state === 'open') where.closedAt = null;
  if (q.priority) where.priority = q.priority;
  if (q.alarmState)
    where.state = Array.isArray(where.state)
      ? where.state.includes(q.alarmState)
        ? q.alarmState
        : []
      : where.state && where.state !== q.alarmState
        ? []
        : q.alarmState;
  return where;
}

/** Newest first, then by id: a total order, so pages never repeat or skip an alarm. */
const ALARM_ORDER: [string, string][] = [
  ['raisedAt', 'DESC'],
  ['id', 'DESC'],
];

/** `engineIds` (the caller's visible engines) narrows the list. */
export async function listAlarms(models: Models, view: (a: Alarm) => AlarmView, q: AlarmListQuery): Promise<AlarmView[]> {
  const rows = await models.Alarm.findAll({ where: alarmWhere(q), order: ALARM_ORDER, limit: q.limit ?? 500 });
  return rows.map(view);
}

/** One page of alarms and how many match over all pages. */
export async function listAlarmsPage(
  models: Models,
  view: (a: Alarm) => AlarmView,
  q: AlarmListQuery & { limit: number; offset: number },
): Promise<{ items: AlarmView[]; total: number; limit: number; offset: number }> {
  const where = alarmWhere(q);
  const [total, rows] = await Promise.all([
    models.Alarm.count({ where }),
    models.Alarm.findAll({ where, order: ALARM_ORDER, limit: q.limit, offset: q.offset }),
  ]);
  return { items: rows.map(view), total, limit: q.limit, offset: q.offset };
}

/** One page of an alarm's history in time order (ties in the order recorded). */
export async function alarmHistory(models: Models, id: number, page: { limit?: number; offset?: number } = {}): Promise<AlarmHistoryPage> {
  const limit = page.limit ?? 200;
  const offset = page.offset ?? 0;
  const { rows, count } = await models.AlarmEvent.findAndCountAll({
    where: { alarmId: id },
    order: [
      ['at', 'ASC'],
      ['id', 'ASC'],
    ],
    limit,
    offset,
  });
  return {
    total: count,
    limit,
    offset,
    entries: rows.map((e): AlarmHistoryView => ({
      at: iso(e.at)!,
      event: e.event,
      fromState: e.fromState as AlarmState | null,
      toState: e.toState as AlarmState | null,
      userId: e.userId,
      value: e.value,
      note: e.note,
    })),
  };
}

/** Ids of every alarm of these engines (site-scoped summaries and reports). */
export async function alarmIdsOf(models: Models, engineIds: number[]): Promise<number[]> {
  const rows = await models.Alarm.findAll({ where: { engineId: engineIds }, attributes: ['id'] });
  return rows.map((a) => a.id);
}

/** Open alarms counted by state, and whether an alarm flood is going on (ISA-18.2: > 10 in 10 min begins, < 5 ends). */
export async function alarmSummary(models: Models, now = Date.now(), engineIds?: number[]) {
  const open = await models.Alarm.findAll({ where: { closedAt: null, ...(engineIds ? { engineId: engineIds } : {}) }, attributes: ['state', 'priority'] });
  const byState: Record<string, number> = {};
  const byPriority: Record<string, number> = {};
  for (const a of open) {
    byState[a.state] = (byState[a.state] ?? 0) + 1;
    if (isAnnunciated(a.state as AlarmState)) byPriority[a.priority] = (byPriority[a.priority] ?? 0) + 1;
  }
  // a flood that began up to an hour ago can still be going on
  const since = now - 60 * 60_000;
  const acts = await models.AlarmEvent.findAll({
    where: { event: 'activate', at: { [Op.gte]: new Date(since) }, ...(engineIds ? { alarmId: await alarmIdsOf(models, engineIds) } : {}) },
    attributes: ['at'],
  });
  const times = acts.map((e) => new Date(e.at).getTime());
  const periods = floodPeriods(times, ISA_18_2_FLOOD, now);
  const last = periods[periods.length - 1];
  const flooding = !!last && last.end === null;
  return {
    open: open.length,
    active: ANNUNCIATED.reduce((n, s) => n + (byState[s] ?? 0), 0),
    byState,
    byPriority,
    flood: {
      flooding,
      since: flooding ? new Date(last.start).toISOString() : null,
      inLast10Min: times.filter((t) => t > now - ISA_18_2_FLOOD.windowMs).length,
    },
  };
}

/** Annunciated alarms per engine (for the engine list). */
export async function activeAlarmCounts(models: Models, engineIds?: number[]): Promise<Map<number, number>> {
  const where: Record<string, unknown> = { closedAt: null, state: ANNUNCIATED };
  if (engineIds) where.engineId = engineIds;
  const rows = await models.Alarm.findAll({ where, attributes: ['engineId'], raw: true });
  const counts = new Map<number, number>();
  for (const r of rows) counts.set(r.engineId, (counts.get(r.engineId) ?? 0) + 1);
  return counts;
}

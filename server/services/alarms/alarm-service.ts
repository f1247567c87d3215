/**
 * Alarms in the database, moved only by the shared ISA-18.2 state machine (shared/alarms/alarm-state.ts).
 * Every transition is written with its alarm_events row in one transaction and pushed to browsers.
 * One open alarm per (engine, rule): a rule that fires again while its alarm is still open
 * re-activates that alarm instead of making a second one. All changes run one after another.
 */
import { Op, UniqueConstraintError, type Sequelize } from 'sequelize';
import { floodPeriods, ISA_18_2_FLOOD } from '../../../shared/alarms/flood';
import { alarmPerformance, type AlarmActivation, type PerformanceReport } from '../../../shared/alarms/performance';
import { isAnnunciated, newAlarm, transition, type AlarmEvent as MachineEvent, type AlarmRecord, type AlarmState } from '../../../shared/alarms/alarm-state';
import type { RuleEvent } from '../../../shared/rules/rule-types';
import { HttpError, notFound } from '../../http-error';
import type { Logger } from '../../logger';
import type { Models } from '../../models';
import type { Alarm } from '../../models/alarm';
import type { AuthUser } from '../../telemetry/types';
import type { AlarmSettings } from './alarm-settings';
import type { EngineDirectory, EngineEntry } from './engine-directory';
import { LAST_LEVEL, type Notifier } from './notifier';
import { atLeast } from './priority';
import type { RuleDefinition } from './rule-definitions';
import { alarmUnit } from './value-format';
import { CHANNELS } from '../../../shared/channels';
import type { AlarmHistoryPage, AlarmHistoryView, AlarmView } from '../../../shared/api/alarms-view';

export type { AlarmHistoryPage, AlarmHistoryView, AlarmView } from '../../../shared/api/alarms-view';

export type ListState = 'active' | 'shelved' | 'open' | 'all';

const ANNUNCIATED: AlarmState[] = ['unacknowledged', 'acknowledged', 'returned-unacknowledged'];
const iso = (d: Date | null | undefined) => (d ? new Date(d).toISOString() : null);
const ms = (d: Date | null | undefined) => (d ? new Date(d).getTime() : null);
const stamp = (t: number) => new Date(t).toISOString().replace('T', ' ').slice(0, 19) + ' UTC';

/** Which way is worse for the value an alarm of this rule carries. */
export function directionOf(def: RuleDefinition): 'high' | 'low' {
  const p = def.params as { direction?: string };
  if (def.kind === 'limit') return p.direction === 'low' ? 'low' : 'high';
  if (def.kind === 'rate') return p.direction === 'falling' ? 'low' : 'high';
  if (def.kind === 'boiling_margin' || def.kind === 'heater_loss') return 'low';
  return 'high';
}

export interface AlarmServiceDeps {
  models: Models;
  sequelize: Sequelize;
  log: Logger;
  settings: AlarmSettings;
  directory: EngineDirectory;
  notifier: Notifier;
  /** The rule definition of an alarm's rule key for an engine (title, meaning, first step, kind). */
  ruleDef(engineId: number, rule: string): RuleDefinition | undefined;
  /** Push a changed alarm to browsers. */
  publish(view: AlarmView): void;
}

export class AlarmService {
  private queue: Promise<unknown> = Promise.resolve();
  /** Open alarms by `${engineId}/${rule}`: id and the worst value written. */
  private readonly open = new Map<string, { id: number; worst: number | null; direction: 'high' | 'low' }>();
  /**
   * Alarms raised from late data (readings older than lateAfterMs when they arrived), by alarm id: not yet
   * e-mailed. Cleared while still late: recorded and closed, never e-mailed. Still active once the engine's
   * data has caught up (or lateAfterMs after they were raised): e-mailed once, saying the data came late.
   */
  /** Recent activation times of open alarms (by id), for chattering. */
  private readonly recentActs = new Map<number, number[]>();
  private readonly pendingLate = new Map<number, { engineId: number; key: string; measuredAt: number; arrivedAt: number }>();

  /** Several servers: housekeeping (shelf expiry, escalation) only for engines whose lease this server holds. */
  private owns: (engineId: number) => boolean = () => true;

  constructor(private readonly deps: AlarmServiceDeps) {}

  setOwnership(owns: (engineId: number) => boolean): void {
    this.owns = owns;
  }

  /** Run `fn` after every change queued before it. */
  private serial<T>(fn: () => Promise<T>): Promise<T> {
    const p = this.queue.then(fn, fn);
    this.queue = p.catch(() => undefined);
    return p;
  }

  /** Wait for every queued change (tests, shutdown). */
  idle(): Promise<void> {
    return this.serial(async () => undefined);
  }

  async loadOpen(): Promise<Alarm[]> {
    const rows = await this.deps.models.Alarm.findAll({ where: { closedAt: null } });
    this.open.clear();
    for (const a of rows) {
      const def = this.deps.ruleDef(a.engineId, a.rule);
      this.open.set(`${a.engineId}/${a.rule}`, { id: a.id, worst: a.worstValue, direction: def ? directionOf(def) : 'high' });
    }
    return rows;
  }

  view(a: Alarm): AlarmView {
    const e = this.deps.directory.get(a.engineId);
    const def = this.deps.ruleDef(a.engineId, a.rule);
    return {
      id: a.id,
      engineId: a.engineId,
      engineName: e?.name ?? null,
      siteId: e?.siteId ?? null,
      siteName: e?.siteName ?? null,
      rule: a.rule,
      title: def?.title ?? a.rule,
      priority: a.priority,
      state: a.state as AlarmState,
      active: a.active,
      raisedAt: iso(a.raisedAt)!,
      value: a.value,
      worstValue: a.worstValue,
      unit: a.unit,
      message: a.message,
      acknowledgedAt: iso(a.acknowledgedAt),
      acknowledgedBy: a.acknowledgedBy ?? null,
      note: a.note ?? null,
      shelvedUntil: iso(a.shelvedUntil),
      shelveReason: a.shelveReason ?? null,
      clearedAt: iso(a.clearedAt),
      closedAt: iso(a.closedAt),
      escalationLevel: a.escalationLevel,
      lastNotifiedAt: iso(a.lastNotifiedAt),
      chatteringAt: iso(a.chatteringAt),
    };
  }

  private record(a: Alarm, direction: 'high' | 'low'): AlarmRecord {
    return {
      ...newAlarm(direction),
      state: a.state as AlarmState,
      active: a.active,
      raisedValue: a.value,
      worstValue: a.worstValue,
      lastValue: a.value,
      message: a.message,
      activatedAt: ms(a.raisedAt),
      clearedAt: ms(a.clearedAt),
      acknowledgedAt: ms(a.acknowledgedAt),
      shelvedUntil: ms(a.shelvedUntil),
      shelveReason: a.shelveReason ?? null,
      // the database keeps the history; the machine only needs the present state
      history: [],
    };
  }

  /** One transition through the shared machine, written with its event row; refused ones change nothing. */
  private async apply(
    a: Alarm,
    event: MachineEvent,
    at: number,
    who: { userId?: number | null; note?: string | null } = {},
    extra: Partial<Alarm> = {},
  ): Promise<{ ok: true } | { ok: false; reason: string }> {
    const key = `${a.engineId}/${a.rule}`;
    const direction = this.open.get(key)?.direction ?? 'high';
    const r = transition(this.record(a, direction), event, at);
    if (!r.ok) return { ok: false, reason: r.reason };
    const n = r.alarm;
    const entry = n.history[n.history.length - 1];
    const closing = n.state === 'normal';
    const fields: Partial<Alarm> = {
      state: n.state,
      active: n.active,
      worstValue: n.worstValue,
      message: n.message ?? a.message,
      clearedAt: n.clearedAt === null ? null : new Date(n.clearedAt),
      acknowledgedAt: n.acknowledgedAt === null ? null : new Date(n.acknowledgedAt),
      shelvedUntil: n.shelvedUntil === null ? null : new Date(n.shelvedUntil),
      shelveReason: n.shelveReason,
      ...(closing ? { closedAt: new Date() } : {}),
      ...extra,
    };
    await this.deps.sequelize.transaction(async (transaction) => {
      await a.update(fields, { transaction });
      await this.deps.models.AlarmEvent.create(
        { alarmId: a.id, at: new Date(at), event: entry.event, fromState: entry.from, toState: entry.to, userId: who.userId ?? null, value: entry.value ?? null, note: who.note ?? entry.note ?? null },
        { transaction },
      );
    });
    if (closing) {
      this.open.delete(key);
      this.recentActs.delete(a.id);
    }
    this.deps.publish(this.view(a));
    return { ok: true };
  }

  /** A rule raised on an engine. `arrivedAt`: when the readings behind it arrived (default now). */
  raise(engine: EngineEntry, def: RuleDefinition, ev: RuleEvent, arrivedAt = Date.now()): Promise<void> {
    return this.serial(async () => {
      const key = `${engine.id}/${def.key}`;
      const known = this.open.get(key);
      if (known) {
        const a = await this.deps.models.Alarm.findByPk(known.id);
        if (a && !a.closedAt) {
          if (!a.active) {
            const r = await this.apply(a, { type: 'activate', value: ev.value, message: ev.message }, ev.ts, {}, { value: ev.value, worstValue: ev.value });
            if (r.ok) await this.countActivation(a, ev.ts);
          }
          return;
        }
        this.open.delete(key);
      }
      await this.create(engine, def, ev, arrivedAt);
    });
  }

  /**
   * Chattering (ISA-18.2: an alarm that repeatedly goes in and out of alarm in a short time): the alarm came into
   * alarm chatterCount times within chatterWindowMs. Marked once, with a note saying what to do about it.
   */
  private async countActivation(a: Alarm, ts: number): Promise<void> {
    const { chatterCount, chatterWindowMs } = this.deps.settings;
    const list = (this.recentActs.get(a.id) ?? []).filter((t) => t > ts - chatterWindowMs);
    list.push(ts);
    this.recentActs.set(a.id, list.slice(-chatterCount));
    if (list.length < chatterCount || a.chatteringAt) return;
    const note = `Chattering: came into alarm ${list.length} times within ${Math.round(chatterWindowMs / 1000)} s. A candidate for a longer deadband or on-/off-delay on this rule (or a sensor to check).`;
    await this.deps.sequelize.transaction(async (transaction) => {
      await a.update({ chatteringAt: new Date(ts) }, { transaction });
      await this.deps.models.AlarmEvent.create({ alarmId: a.id, at: new Date(ts), event: 'note', fromState: a.state, toState: a.state, userId: null, value: null, note }, { transaction });
    });
    this.deps.publish(this.view(a));
  }

  /** True when alarms of this engine wait for its data to catch up. */
  hasPendingLate(engineId: number): boolean {
    for (const p of this.pendingLate.values()) if (p.engineId === engineId) return true;
    return false;
  }

  /**
   * The engine's data has caught up (its newest reading is recent), or `engineId` null: every pending alarm
   * raised more than lateAfterMs ago. Alarms from late data still active now are e-mailed once.
   */
  caughtUp(engineId: number | null, now = Date.now()): Promise<void> {
    return this.serial(async () => {
      for (const [id, p] of [...this.pendingLate]) {
        if (engineId !== null ? p.engineId !== engineId : now - p.arrivedAt < this.deps.settings.lateAfterMs) continue;
        this.pendingLate.delete(id);
        const a = await this.deps.models.Alarm.findByPk(id);
        const engine = this.deps.directory.get(p.engineId);
        if (!a || a.closedAt || !a.active || !engine) continue;
        await this.notify(a, engine, 0, { measuredAt: p.measuredAt, arrivedAt: p.arrivedAt });
      }
    });
  }

  private async create(engine: EngineEntry, def: RuleDefinition, ev: RuleEvent, arrivedAt: number): Promise<void> {
    const direction = directionOf(def);
    const r = transition(newAlarm(direction), { type: 'activate', value: ev.value, message: ev.message }, ev.ts);
    if (!r.ok) return;
    const entry = r.alarm.history[0];
    let a: Alarm;
    try {
      a = await this.deps.sequelize.transaction(async (transaction) => {
        const row = await this.deps.models.Alarm.create(
          {
            engineId: engine.id,
            rule: def.key,
            priority: def.priority,
            state: r.alarm.state,
            active: true,
            raisedAt: new Date(ev.ts),
            value: ev.value,
            worstValue: ev.value,
            unit: alarmUnit(def.kind, CHANNELS[def.channel].unit),
            message: ev.message.slice(0, 500),
          },
          { transaction },
        );
        await this.deps.models.AlarmEvent.create(
          { alarmId: row.id, at: new Date(ev.ts), event: entry.event, fromState: entry.from, toState: entry.to, userId: null, value: ev.value, note: null },
          { transaction },
        );
        return row;
      });
    } catch (err) {
      // the partial unique index says one is already open (e.g. written by another process): adopt it
      if (err instanceof UniqueConstraintError) {
        await this.loadOpen();
        return;
      }
      throw err;
    }
    this.open.set(`${engine.id}/${def.key}`, { id: a.id, worst: ev.value, direction });
    this.recentActs.set(a.id, [ev.ts]);
    this.deps.publish(this.view(a));
    const late = arrivedAt - ev.ts > this.deps.settings.lateAfterMs;
    if (late) {
      await this.deps.models.AlarmEvent.create({
        alarmId: a.id, at: new Date(arrivedAt), event: 'note', fromState: a.state, toState: a.state, userId: null, value: null,
        note: `Raised from readings that arrived late (measured ${stamp(ev.ts)}, arrived ${stamp(arrivedAt)}): e-mailed only if still active once the data has caught up.`,
      });
    }
    if (!atLeast(def.priority, this.deps.settings.notifyMinPriority)) return;
    if (late) this.pendingLate.set(a.id, { engineId: engine.id, key: `${engine.id}/${def.key}`, measuredAt: ev.ts, arrivedAt });
    else await this.notify(a, engine, 0);
  }

  private async notify(a: Alarm, engine: EngineEntry, fromLevel: number, late?: { measuredAt: number; arrivedAt: number }): Promise<void> {
    const def = this.deps.ruleDef(a.engineId, a.rule);
    if (!def) return;
    const sent = await this.deps.notifier.notify(a, def, engine, fromLevel, late);
    const note = (sent.to.length ? `e-mail to ${sent.to.map((u) => u.email).join(', ')}` : 'nobody to e-mail') + (late ? ' (from late data, still active)' : '');
    await this.deps.sequelize.transaction(async (transaction) => {
      await a.update({ escalationLevel: sent.level, lastNotifiedAt: new Date() }, { transaction });
      await this.deps.models.AlarmEvent.create(
        { alarmId: a.id, at: new Date(), event: fromLevel === 0 ? 'notified' : 'escalated', fromState: a.state, toState: a.state, userId: null, value: null, note },
        { transaction },
      );
    });
    this.deps.publish(this.view(a));
  }

  /** A rule returned to normal on an engine. */
  clear(engineId: number, def: RuleDefinition, ev: RuleEvent): Promise<void> {
    return this.serial(async () => {
      const known = this.open.get(`${engineId}/${def.key}`);
      if (!known) return;
      const a = await this.deps.models.Alarm.findByPk(known.id);
      if (!a || a.closedAt) {
        this.open.delete(`${engineId}/${def.key}`);
        return;
      }
      if (a.active) await this.apply(a, { type: 'clear', value: ev.value }, Math.max(ev.ts, ms(a.raisedAt) ?? ev.ts));
      if (this.pendingLate.delete(a.id) && !a.closedAt) {
        // raised and cleared within late data: recorded, closed, never e-mailed (nobody is paged for history)
        const note = `Raised and cleared within readings that arrived late (backfill or store-and-forward): the condition had already cleared when its data arrived, so nobody was e-mailed.`;
        await this.apply(a, { type: 'acknowledge', by: 'Jacketwatch', comment: note }, Math.max(Date.now(), ms(a.clearedAt) ?? 0), { note });
      }
    });
  }

  /** Keep the worst value of an active alarm (from the rule's own record of it). */
  updateWorst(engineId: number, rule: string, worst: number): Promise<void> {
    const known = this.open.get(`${engineId}/${rule}`);
    if (!known || !Number.isFinite(worst)) return Promise.resolve();
    const worse = known.worst === null || (known.direction === 'high' ? worst > known.worst : worst < known.worst);
    if (!worse) return Promise.resolve();
    known.worst = worst;
    return this.serial(async () => {
      const a = await this.deps.models.Alarm.findByPk(known.id);
      if (!a || a.closedAt || !a.active) return;
      await a.update({ worstValue: worst });
      this.deps.publish(this.view(a));
    });
  }

  /** Open alarm keys with their ids (the rule engine restores active rule states from these). */
  openAlarms(): Map<string, number> {
    return new Map([...this.open].map(([k, v]) => [k, v.id]));
  }

  private async find(id: number): Promise<Alarm> {
    const a = await this.deps.models.Alarm.findByPk(id);
    if (!a) throw notFound('alarm');
    return a;
  }

  acknowledge(id: number, user: AuthUser, note: string | null): Promise<AlarmView> {
    return this.serial(async () => {
      const a = await this.find(id);
      if (a.closedAt) throw new HttpError(409, 'alarm is closed: nothing to acknowledge');
      const r = await this.apply(a, { type: 'acknowledge', by: user.email, comment: note ?? undefined }, Date.now(), { userId: user.id, note }, { acknowledgedBy: user.id, ...(note ? { note } : {}) });
      if (!r.ok) throw new HttpError(409, r.reason);
      return this.view(a);
    });
  }

  shelve(id: number, user: AuthUser, minutes: number, reason: string): Promise<AlarmView> {
    return this.serial(async () => {
      const a = await this.find(id);
      if (a.closedAt) throw new HttpError(409, 'alarm is closed: nothing to shelve');
      const r = await this.apply(a, { type: 'shelve', minutes, reason, by: user.email }, Date.now(), { userId: user.id, note: reason }, { shelvedBy: user.id });
      if (!r.ok) throw new HttpError(409, r.reason);
      return this.view(a);
    });
  }

  unshelve(id: number, user: AuthUser): Promise<AlarmView> {
    return this.serial(async () => {
      const a = await this.find(id);
      const r = await this.apply(a, { type: 'unshelve', by: user.email }, Date.now(), { userId: user.id });
      if (!r.ok) throw new HttpError(409, r.reason);
      return this.view(a);
    });
  }

  addNote(id: number, user: AuthUser, note: string): Promise<AlarmView> {
    return this.serial(async () => {
      const a = await this.find(id);
      await this.deps.sequelize.transaction(async (transaction) => {
        await a.update({ note }, { transaction });
        await this.deps.models.AlarmEvent.create(
          { alarmId: a.id, at: new Date(), event: 'note', fromState: a.state, toState: a.state, userId: user.id, value: null, note },
          { transaction },
        );
      });
      this.deps.publish(this.view(a));
      return this.view(a);
    });
  }

  /** An engine taken out of service (or back): its open alarms leave annunciation (or come back). */
  setOutOfService(engineId: number, outOfService: boolean): Promise<void> {
    return this.serial(async () => {
      const rows = await this.deps.models.Alarm.findAll({ where: { engineId, closedAt: null } });
      for (const a of rows) {
        if (outOfService && a.state !== 'out-of-service') await this.apply(a, { type: 'remove-from-service', reason: 'engine out of service' }, Date.now());
        if (!outOfService && a.state === 'out-of-service') await this.apply(a, { type: 'return-to-service' }, Date.now());
      }
    });
  }

  /** Each tick: shelves that have run out come back; unacknowledged alarms escalate. */
  housekeeping(now = Date.now()): Promise<void> {
    return this.serial(async () => {
      const { Alarm } = this.deps.models;
      const expired = await Alarm.findAll({ where: { state: 'shelved', closedAt: null, shelvedUntil: { [Op.lte]: new Date(now) } } });
      for (const a of expired) {
        if (!this.owns(a.engineId)) continue;
        await this.apply(a, { type: 'shelf-expired' }, Math.max(now, ms(a.shelvedUntil) ?? now));
      }
      const due = await Alarm.findAll({
        where: {
          state: 'unacknowledged',
          closedAt: null,
          acknowledgedAt: null,
          escalationLevel: { [Op.lt]: LAST_LEVEL },
          lastNotifiedAt: { [Op.lte]: new Date(now - this.deps.settings.escalateAfterMs) },
        },
      });
      const cutoff = new Date(now - this.deps.settings.escalateAfterMs);
      for (const a of due) {
        const engine = this.deps.directory.get(a.engineId);
        if (!engine || !this.owns(a.engineId)) continue;
        // claimed once: only the server whose update finds the alarm still due sends the escalation (a lease that
        // moved between two servers' housekeeping rounds must not escalate twice)
        const [claimed] = await Alarm.update(
          { lastNotifiedAt: new Date(now) },
          { where: { id: a.id, escalationLevel: a.escalationLevel, acknowledgedAt: null, lastNotifiedAt: { [Op.lte]: cutoff } } },
        );
        if (claimed !== 1) continue;
        await this.notify(a, engine, a.escalationLevel + 1);
      }
    });
  }

  /** `engineIds` (the caller's visible engines) narrows the list. */
  async list(q: { state: ListState; engineId?: number; engineIds?: number[]; limit?: number }): Promise<AlarmView[]> {
    const where: Record<string, unknown> = {};
    if (q.engineIds !== undefined) where.engineId = q.engineId === undefined ? q.engineIds : q.engineIds.filter((id) => id === q.engineId);
    else if (q.engineId !== undefined) where.engineId = q.engineId;
    if (q.state === 'active') Object.assign(where, { closedAt: null, state: ANNUNCIATED });
    else if (q.state === 'shelved') Object.assign(where, { closedAt: null, state: 'shelved' });
    else if (q.state === 'open') where.closedAt = null;
    const rows = await this.deps.models.Alarm.findAll({ where, order: [['raisedAt', 'DESC'], ['id', 'DESC']], limit: q.limit ?? 500 });
    return rows.map((a) => this.view(a));
  }

  async get(id: number, page: { limit?: number; offset?: number } = {}): Promise<AlarmView & { history: AlarmHistoryView[]; historyTotal: number; meaning: string | null; firstStep: string | null }> {
    const a = await this.find(id);
    const h = await this.history(id, page);
    const def = this.deps.ruleDef(a.engineId, a.rule);
    return { ...this.view(a), meaning: def?.meaning ?? null, firstStep: def?.firstStep ?? null, history: h.entries, historyTotal: h.total };
  }

  /** One page of an alarm's history in time order (ties in the order recorded). */
  async history(id: number, page: { limit?: number; offset?: number } = {}): Promise<AlarmHistoryPage> {
    const limit = page.limit ?? 200;
    const offset = page.offset ?? 0;
    const { rows, count } = await this.deps.models.AlarmEvent.findAndCountAll({ where: { alarmId: id }, order: [['at', 'ASC'], ['id', 'ASC']], limit, offset });
    return {
      total: count, limit, offset,
      entries: rows.map((e) => ({ at: iso(e.at)!, event: e.event, fromState: e.fromState as AlarmState | null, toState: e.toState as AlarmState | null, userId: e.userId, value: e.value, note: e.note })),
    };
  }

  /** Ids of every alarm of these engines (site-scoped summaries). */
  private async alarmIdsOf(engineIds: number[]): Promise<number[]> {
    const rows = await this.deps.models.Alarm.findAll({ where: { engineId: engineIds }, attributes: ['id'] });
    return rows.map((a) => a.id);
  }

  /** Open alarms counted by state, and whether an alarm flood is going on (ISA-18.2: > 10 in 10 min begins, < 5 ends). */
  async summary(now = Date.now(), engineIds?: number[]) {
    const open = await this.deps.models.Alarm.findAll({ where: { closedAt: null, ...(engineIds ? { engineId: engineIds } : {}) }, attributes: ['state', 'priority'] });
    const byState: Record<string, number> = {};
    const byPriority: Record<string, number> = {};
    for (const a of open) {
      byState[a.state] = (byState[a.state] ?? 0) + 1;
      if (isAnnunciated(a.state as AlarmState)) byPriority[a.priority] = (byPriority[a.priority] ?? 0) + 1;
    }
    // a flood that began up to an hour ago can still be going on
    const since = now - 60 * 60_000;
    const acts = await this.deps.models.AlarmEvent.findAll({ where: { event: 'activate', at: { [Op.gte]: new Date(since) }, ...(engineIds ? { alarmId: await this.alarmIdsOf(engineIds) } : {}) }, attributes: ['at'] });
    const times = acts.map((e) => new Date(e.at).getTime());
    const periods = floodPeriods(times, ISA_18_2_FLOOD, now);
    const last = periods[periods.length - 1];
    const flooding = !!last && last.end === null;
    return {
      open: open.length,
      active: ANNUNCIATED.reduce((n, s) => n + (byState[s] ?? 0), 0),
      byState,
      byPriority,
      flood: { flooding, since: flooding ? new Date(last.start).toISOString() : null, inLast10Min: times.filter((t) => t > now - ISA_18_2_FLOOD.windowMs).length },
    };
  }

  /** ISA-18.2 style performance figures over [from, to) from the recorded activations. */
  async performance(from: number, to: number, engineIds?: number[], chatter: { count?: number; windowMs?: number } = {}): Promise<PerformanceReport> {
    const { AlarmEvent, Alarm } = this.deps.models;
    const scoped = engineIds ? { alarmId: await this.alarmIdsOf(engineIds) } : {};
    const acts = await AlarmEvent.findAll({ where: { event: 'activate', at: { [Op.gte]: new Date(from), [Op.lt]: new Date(to) }, ...scoped }, order: [['at', 'ASC']] });
    const ids = [...new Set(acts.map((e) => e.alarmId))];
    const [alarms, later] = ids.length
      ? await Promise.all([
          Alarm.findAll({ where: { id: ids }, attributes: ['id', 'engineId', 'rule'] }),
          AlarmEvent.findAll({ where: { alarmId: ids, event: ['acknowledge', 'clear'] }, order: [['at', 'ASC']] }),
        ])
      : [[], []];
    const keyOf = new Map(alarms.map((a) => [a.id, `${this.deps.directory.get(a.engineId)?.name ?? `engine ${a.engineId}`}/${a.rule}`]));
    const activations: AlarmActivation[] = acts.map((e) => {
      const at = new Date(e.at).getTime();
      const after = (kind: string) => later.find((l) => l.alarmId === e.alarmId && l.event === kind && new Date(l.at).getTime() >= at);
      const ack = after('acknowledge');
      const clr = after('clear');
      return { key: keyOf.get(e.alarmId) ?? String(e.alarmId), activatedAt: at, acknowledgedAt: ack ? new Date(ack.at).getTime() : null, clearedAt: clr ? new Date(clr.at).getTime() : null };
    });
    return alarmPerformance(activations, {
      from, to,
      chatterCount: chatter.count ?? this.deps.settings.chatterCount,
      chatterWindowMs: chatter.windowMs ?? this.deps.settings.chatterWindowMs,
    });
  }
}

/** Annunciated alarms per engine (for the engine list). */
export async function activeAlarmCounts(models: Models): Promise<Map<number, number>> {
  const rows = await models.Alarm.findAll({ where: { closedAt: null, state: ANNUNCIATED }, attributes: ['engineId'] });
  const counts = new Map<number, number>();
  for (const r of rows) counts.set(r.engineId, (counts.get(r.engineId) ?? 0) + 1);
  return counts;
}

/**
 * Alarms in the database, moved only by the shared ISA-18.2 state machine (shared/alarms/alarm-state.ts).
 * Every transition is written with its alarm_events row in one transaction and pushed to browsers.
 * One open alarm per (engine, rule): a rule that fires again while its alarm is still open
 * re-activates that alarm instead of making a second one. All changes run one after another.
 */
import { UniqueConstraintError, type Sequelize } from 'sequelize';
import type { PerformanceReport } from '../../../shared/alarms/performance';
import { newAlarm, transition, type AlarmEvent as MachineEvent } from '../../../shared/alarms/alarm-state';
import type { RuleEvent } from '../../../shared/rules/rule-types';
import { HttpError } from '../../http-error';
import type { Logger } from '../../logger';
import type { Models } from '../../models';
import type { Alarm } from '../../models/alarm';
import type { AuthUser } from '../../telemetry/types';
import { housekeepingRound } from './alarm-housekeeping';
import { performanceReport } from './alarm-performance';
import { alarmHistory, alarmSummary, findAlarm, listAlarms, listAlarmsPage, type AlarmListQuery } from './alarm-queries';
import type { AlarmSettings } from './alarm-settings';
import { alarmRecord, alarmView, directionOf, ms } from './alarm-view';
import type { EngineDirectory, EngineEntry } from './engine-directory';
import type { Notifier } from './notifier';
import { atLeast } from './priority';
import type { RuleDefinition } from './rule-definitions';
import { alarmUnit } from './value-format';
import { WriteQueue } from './write-queue';
import { CHANNELS } from '../../../shared/channels';
import type { AlarmHistoryPage, AlarmHistoryView, AlarmView } from '../../../shared/api/alarms-view';
import { formatInZone } from '../../../shared/time/zoned-time';

export type { AlarmHistoryPage, AlarmHistoryView, AlarmView } from '../../../shared/api/alarms-view';

/** A time in a note or e-mail: the app's one format in the site's zone ("2026-12-02 14:05:09 MST"). */
const stamp = (t: number, zone: string) => formatInZone(t, zone || 'UTC', 'datetime-s');

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

/**
 * The alarm lifecycle (raise, clear, acknowledge, shelve, notes, out of service, late data, chattering),
 * written through the write queue; reads, the performance report and housekeeping are in their own files.
 */
export class AlarmService {
  private readonly queue = new WriteQueue();
  /** Open alarms by `${engineId}/${rule}`: id and the worst value written. */
  private readonly open = new Map<string, { id: number; worst: number | null; direction: 'high' | 'low' }>();
  /** Recent activation times of open alarms (by id), for chattering. */
  private readonly recentActs = new Map<number, number[]>();
  /**
   * Alarms raised from late data (readings older than lateAfterMs when they arrived), by alarm id: not yet
   * e-mailed. Cleared while still late: recorded and closed, never e-mailed. Still active once the engine's
   * data has caught up (or lateAfterMs after they were raised): e-mailed once, saying the data came late.
   * Mirrored in `alarms.mail_held_since`, so a held e-mail survives a restart (loadOpen reads it back).
   */
  private readonly pendingLate = new Map<number, { engineId: number; measuredAt: number; arrivedAt: number }>();

  /** Several servers: housekeeping (shelf expiry, escalation) only for engines whose lease this server holds. */
  private owns: (engineId: number) => boolean = () => true;

  constructor(private readonly deps: AlarmServiceDeps) {}

  setOwnership(owns: (engineId: number) => boolean): void {
    this.owns = owns;
  }

  /** Run `fn` after every change queued before it. */
  private serial<T>(fn: () => Promise<T>): Promise<T> {
    return this.queue.run(fn);
  }

  /** Wait for every queued change (tests, shutdown). */
  idle(): Promise<void> {
    return this.queue.idle();
  }

  async loadOpen(): Promise<Alarm[]> {
    const rows = await this.deps.models.Alarm.findAll({ where: { closedAt: null } });
    this.open.clear();
    this.pendingLate.clear();
    for (const a of rows) {
      const def = this.deps.ruleDef(a.engineId, a.rule);
      this.open.set(`${a.engineId}/${a.rule}`, { id: a.id, worst: a.worstValue, direction: def ? directionOf(def) : 'high' });
      // an e-mail held for late data before a restart is held again (and sent once the data has caught up)
      if (a.mailHeldSince)
        this.pendingLate.set(a.id, { engineId: a.engineId, measuredAt: new Date(a.raisedAt).getTime(), arrivedAt: new Date(a.mailHeldSince).getTime() });
    }
    return rows;
  }

  view(a: Alarm): AlarmView {
    return alarmView(a, this.deps.directory, this.deps.ruleDef);
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
    const r = transition(alarmRecord(a, direction), event, at);
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
        {
          alarmId: a.id,
          at: new Date(at),
          event: entry.event,
          fromState: entry.from,
          toState: entry.to,
          userId: who.userId ?? null,
          value: entry.value ?? null,
          note: who.note ?? entry.note ?? null,
        },
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
      await this.deps.models.AlarmEvent.create(
        { alarmId: a.id, at: new Date(ts), event: 'note', fromState: a.state, toState: a.state, userId: null, value: null, note },
        { transaction },
      );
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
        if (!a) continue;
        const engine = this.deps.directory.get(p.engineId);
        if (a.closedAt || !a.active || !engine) {
          if (a.mailHeldSince) await a.update({ mailHeldSince: null });
          continue;
        }
        await this.notify(a, engine, 0, { measuredAt: p.measuredAt, arrivedAt: p.arrivedAt });
      }
    });
  }

  private async create(engine: EngineEntry, def: RuleDefinition, ev: RuleEvent, arrivedAt: number): Promise<void> {
    const direction = directionOf(def);
    const late = arrivedAt - ev.ts > this.deps.settings.lateAfterMs;
    const mailed = atLeast(def.priority, this.deps.settings.notifyMinPriority);
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
            // from late data: its e-mail waits for the data to catch up (kept across a restart)
            mailHeldSince: late && mailed ? new Date(arrivedAt) : null,
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
    if (late) {
      await this.deps.models.AlarmEvent.create({
        alarmId: a.id,
        at: new Date(arrivedAt),
        event: 'note',
        fromState: a.state,
        toState: a.state,
        userId: null,
        value: null,
        note: `Raised from readings that arrived late (measured ${stamp(ev.ts, engine.timeZone)}, arrived ${stamp(arrivedAt, engine.timeZone)}): e-mailed only if still active once the data has caught up.`,
      });
    }
    if (!mailed) return;
    if (late) this.pendingLate.set(a.id, { engineId: engine.id, measuredAt: ev.ts, arrivedAt });
    else await this.notify(a, engine, 0);
  }

  private async notify(a: Alarm, engine: EngineEntry, fromLevel: number, late?: { measuredAt: number; arrivedAt: number }): Promise<void> {
    const def = this.deps.ruleDef(a.engineId, a.rule);
    if (!def) return;
    const sent = await this.deps.notifier.notify(a, def, engine, fromLevel, late);
    const note =
      (sent.to.length ? `e-mail to ${sent.to.map((u) => u.email).join(', ')}` : 'nobody to e-mail') + (late ? ' (from late data, still active)' : '');
    await this.deps.sequelize.transaction(async (transaction) => {
      await a.update({ escalationLevel: sent.level, lastNotifiedAt: new Date(), ...(a.mailHeldSince ? { mailHeldSince: null } : {}) }, { transaction });
      await this.deps.models.AlarmEvent.create(
        {
          alarmId: a.id,
          at: new Date(),
          event: fromLevel === 0 ? 'notified' : 'escalated',
          fromState: a.state,
          toState: a.state,
          userId: null,
          value: null,
          note,
        },
        { transaction },
      );
    });
    this.deps.publish(this.view(a));
  }

  /**
   * A condition found in late readings older than the newest already evaluated (late-evaluation.ts). The newer
   * readings decide the present state, so this is history: with no alarm of the rule open it is recorded as an
   * alarm raised, cleared (at its clear, or at the end of the late data when newer readings show it gone) and
   * closed, never e-mailed; with one open, that alarm gets a note. Nobody is paged for history.
   */
  recordPast(engine: EngineEntry, f: { def: RuleDefinition; raise: RuleEvent; clear: RuleEvent | null; endTs: number; arrivedAt: number }): Promise<void> {
    return this.serial(async () => {
      const { def, raise } = f;
      const clearedAt = Math.max(raise.ts, f.clear?.ts ?? f.endTs);
      const zone = engine.timeZone;
      const span = `measured ${stamp(raise.ts, zone)}, arrived ${stamp(f.arrivedAt, zone)}`;
      const known = this.open.get(`${engine.id}/${def.key}`);
      if (known) {
        const note = `Late readings (${span}) show this condition then as well: ${raise.message.slice(0, 300)}`;
        await this.deps.models.AlarmEvent.create({
          alarmId: known.id,
          at: new Date(f.arrivedAt),
          event: 'note',
          fromState: null,
          toState: null,
          userId: null,
          value: raise.value,
          note,
        });
        return;
      }
      const direction = directionOf(def);
      const note = f.clear
        ? `Found in readings that arrived late, older than readings already evaluated (${span}): raised and cleared within them, recorded for the record; nobody was e-mailed.`
        : `Found in readings that arrived late, older than readings already evaluated (${span}): still present at their end (${stamp(f.endTs, zone)}), and the newer readings already evaluated do not show it, so it is recorded as cleared; nobody was e-mailed.`;
      let rec = newAlarm(direction);
      for (const [event, at] of [
        [{ type: 'activate', value: raise.value, message: raise.message }, raise.ts],
        [{ type: 'clear', value: f.clear?.value ?? null }, clearedAt],
        [{ type: 'acknowledge', by: 'Jacketwatch', comment: note }, Math.max(clearedAt, f.arrivedAt)],
      ] as [MachineEvent, number][]) {
        const r = transition(rec, event, at);
        if (!r.ok) return;
        rec = r.alarm;
      }
      const a = await this.deps.sequelize.transaction(async (transaction) => {
        const row = await this.deps.models.Alarm.create(
          {
            engineId: engine.id,
            rule: def.key,
            priority: def.priority,
            state: rec.state,
            active: false,
            raisedAt: new Date(raise.ts),
            value: raise.value,
            worstValue: rec.worstValue ?? raise.value,
            unit: alarmUnit(def.kind, CHANNELS[def.channel].unit),
            message: raise.message.slice(0, 500),
            clearedAt: new Date(clearedAt),
            acknowledgedAt: new Date(Math.max(clearedAt, f.arrivedAt)),
            closedAt: new Date(),
          },
          { transaction },
        );
        for (const h of rec.history) {
          await this.deps.models.AlarmEvent.create(
            {
              alarmId: row.id,
              at: new Date(h.at),
              event: h.event,
              fromState: h.from,
              toState: h.to,
              userId: null,
              value: h.value ?? null,
              note: h.event === 'acknowledge' ? note : (h.note ?? null),
            },
            { transaction },
          );
        }
        return row;
      });
      this.deps.publish(this.view(a));
    });
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
      const held = this.pendingLate.delete(a.id);
      if (held && a.closedAt) {
        if (a.mailHeldSince) await a.update({ mailHeldSince: null }); // acknowledged before it cleared: closed now, nothing to send
      } else if (held) {
        // raised and cleared within late data: recorded, closed, never e-mailed (nobody is paged for history)
        const note = `Raised and cleared within readings that arrived late (backfill or store-and-forward): the condition had already cleared when its data arrived, so nobody was e-mailed.`;
        await this.apply(
          a,
          { type: 'acknowledge', by: 'Jacketwatch', comment: note },
          Math.max(Date.now(), ms(a.clearedAt) ?? 0),
          { note },
          { mailHeldSince: null },
        );
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

  private find(id: number): Promise<Alarm> {
    return findAlarm(this.deps.models, id);
  }

  acknowledge(id: number, user: AuthUser, note: string | null): Promise<AlarmView> {
    return this.serial(async () => {
      const a = await this.find(id);
      if (a.closedAt) throw new HttpError(409, 'alarm is closed: nothing to acknowledge');
      const r = await this.apply(
        a,
        { type: 'acknowledge', by: user.email, comment: note ?? undefined },
        Date.now(),
        { userId: user.id, note },
        { acknowledgedBy: user.id, ...(note ? { note } : {}) },
      );
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

  /** Each tick: shelves that have run out come back; unacknowledged alarms escalate (alarm-housekeeping.ts). */
  housekeeping(now = Date.now()): Promise<void> {
    return this.serial(() =>
      housekeepingRound(
        { models: this.deps.models, directory: this.deps.directory, escalateAfterMs: this.deps.settings.escalateAfterMs, owns: this.owns },
        {
          shelfExpired: (a, at) => this.apply(a, { type: 'shelf-expired' }, at),
          escalate: (a, engine) => this.notify(a, engine, a.escalationLevel + 1),
        },
        now,
      ),
    );
  }

  /** `engineIds` (the caller's visible engines) narrows the list (alarm-queries.ts). */
  list(q: AlarmListQuery): Promise<AlarmView[]> {
    return listAlarms(this.deps.models, (a) => this.view(a), q);
  }

  /** One page of the list and how many match over all pages (alarm-queries.ts). */
  listPage(q: AlarmListQuery & { limit: number; offset: number }) {
    return listAlarmsPage(this.deps.models, (a) => this.view(a), q);
  }

  async get(
    id: number,
    page: { limit?: number; offset?: number } = {},
  ): Promise<AlarmView & { history: AlarmHistoryView[]; historyTotal: number; meaning: string | null; firstStep: string | null }> {
    const a = await this.find(id);
    const h = await this.history(id, page);
    const def = this.deps.ruleDef(a.engineId, a.rule);
    return { ...this.view(a), meaning: def?.meaning ?? null, firstStep: def?.firstStep ?? null, history: h.entries, historyTotal: h.total };
  }

  /** One page of an alarm's history in time order (ties in the order recorded). */
  history(id: number, page: { limit?: number; offset?: number } = {}): Promise<AlarmHistoryPage> {
    return alarmHistory(this.deps.models, id, page);
  }

  /** Open alarms counted by state, and the flood state (alarm-queries.ts). */
  summary(now = Date.now(), engineIds?: number[]) {
    return alarmSummary(this.deps.models, now, engineIds);
  }

  /** ISA-18.2 style performance figures over [from, to) (alarm-performance.ts). */
  performance(from: number, to: number, engineIds?: number[], chatter: { count?: number; windowMs?: number } = {}): Promise<PerformanceReport> {
    return performanceReport(this.deps, from, to, engineIds, chatter);
  }
}

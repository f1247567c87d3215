/** Mapping between stored alarms, the shared state machine's record and the API's view. */
import { newAlarm, type AlarmRecord, type AlarmState } from '../../../shared/alarms/alarm-state';
import type { AlarmView } from '../../../shared/api/alarms-view';
import type { Alarm } from '../../models/alarm';
import type { EngineDirectory } from './engine-directory';
import type { RuleDefinition } from './rule-definitions';

export const iso = (d: Date | null | undefined) => (d ? new Date(d).toISOString() : null);
export const ms = (d: Date | null | undefined) => (d ? new Date(d).getTime() : null);

/** The rule definition of an alarm's rule key for an engine (title, meaning, first step, kind). */
export type RuleDefLookup = (engineId: number, rule: string) => RuleDefinition | undefined;

/** Which way is worse for the value an alarm of this rule carries. */
export function directionOf(def: RuleDefinition): 'high' | 'low' {
  const p = def.params as { direction?: string };
  if (def.kind === 'limit') return p.direction === 'low' ? 'low' : 'high';
  if (def.kind === 'rate') return p.direction === 'falling' ? 'low' : 'high';
  if (def.kind === 'boiling_margin' || def.kind === 'heater_loss') return 'low';
  return 'high';
}

/** An alarm as the API and browsers see it. */
export function alarmView(a: Alarm, directory: EngineDirectory, ruleDef: RuleDefLookup): AlarmView {
  const e = directory.get(a.engineId);
  const def = ruleDef(a.engineId, a.rule);
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

/** A stored alarm as the shared state machine's record (its present state; the database keeps the history). */
export function alarmRecord(a: Alarm, direction: 'high' | 'low'): AlarmRecord {
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
    history: [],
  };
}

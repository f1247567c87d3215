/**
 * Alarm lifecycle after ISA-18.2 / IEC 62682 (alarm state transition diagram):
 * normal -> unacknowledged (active) -> acknowledged (active) -> normal, or
 * unacknowledged -> returned-to-normal-unacknowledged -> normal on acknowledge;
 * shelved (by an operator, for a limited time, with a reason), suppressed by design
 * (by logic, e.g. engine stopped) and out of service (maintenance) take an alarm out of
 * annunciation. The process condition (`active`) is still tracked while out of annunciation,
 * so on return the alarm comes back as unacknowledged if the condition is present.
 * Not latched: a returned alarm goes back to normal once acknowledged.
 */

export type AlarmState = 'normal' | 'unacknowledged' | 'acknowledged' | 'returned-unacknowledged' | 'shelved' | 'suppressed-by-design' | 'out-of-service';

export const ALARM_STATES: readonly AlarmState[] = [
  'normal',
  'unacknowledged',
  'acknowledged',
  'returned-unacknowledged',
  'shelved',
  'suppressed-by-design',
  'out-of-service',
];

export const SHELVE_MIN_MINUTES = 1;
export const SHELVE_MAX_MINUTES = 1440;

export type AlarmEvent =
  | { type: 'activate'; value: number | null; message?: string }
  | { type: 'clear'; value?: number | null }
  /** A newer value while active: updates last and worst value, no state change. */
  | { type: 'value'; value: number }
  | { type: 'acknowledge'; by?: string; comment?: string }
  | { type: 'shelve'; minutes: number; reason: string; by?: string }
  | { type: 'unshelve'; by?: string }
  | { type: 'shelf-expired' }
  | { type: 'suppress'; reason?: string }
  | { type: 'unsuppress' }
  | { type: 'remove-from-service'; reason: string; by?: string }
  | { type: 'return-to-service'; by?: string };

export type AlarmEventType = AlarmEvent['type'];

export interface AlarmHistoryEntry {
  at: number;
  event: AlarmEventType;
  from: AlarmState;
  to: AlarmState;
  value?: number | null;
  by?: string;
  note?: string;
}

export interface AlarmRecord {
  state: AlarmState;
  /** The process condition, tracked in every state. */
  active: boolean;
  /** 'high': larger values are worse; 'low': smaller. */
  direction: 'high' | 'low';
  raisedValue: number | null;
  worstValue: number | null;
  lastValue: number | null;
  message: string | null;
  activatedAt: number | null;
  clearedAt: number | null;
  acknowledgedAt: number | null;
  acknowledgedBy: string | null;
  shelvedUntil: number | null;
  shelveReason: string | null;
  outOfServiceReason: string | null;
  history: AlarmHistoryEntry[];
}

export type TransitionResult = { ok: true; alarm: AlarmRecord } | { ok: false; reason: string; alarm: AlarmRecord };

export function newAlarm(direction: 'high' | 'low' = 'high'): AlarmRecord {
  return {
    state: 'normal',
    active: false,
    direction,
    raisedValue: null,
    worstValue: null,
    lastValue: null,
    message: null,
    activatedAt: null,
    clearedAt: null,
    acknowledgedAt: null,
    acknowledgedBy: null,
    shelvedUntil: null,
    shelveReason: null,
    outOfServiceReason: null,
    history: [],
  };
}

/** States in which the alarm is annunciated to the operator. */
export function isAnnunciated(state: AlarmState): boolean {
  return state === 'unacknowledged' || state === 'acknowledged' || state === 'returned-unacknowledged';
}

const OUT_OF_ANNUNCIATION: readonly AlarmState[] = ['shelved', 'suppressed-by-design', 'out-of-service'];

function refuse(alarm: AlarmRecord, reason: string): TransitionResult {
  return { ok: false, reason, alarm };
}

function worse(a: AlarmRecord, v: number): boolean {
  return a.worstValue === null || (a.direction === 'high' ? v > a.worstValue : v < a.worstValue);
}

/** State an alarm takes when it comes back into annunciation (unshelve, unsuppress, return to service). */
function backInto(a: AlarmRecord): AlarmState {
  return a.active ? 'unacknowledged' : 'normal';
}

export function transition(alarm: AlarmRecord, event: AlarmEvent, at: number): TransitionResult {
  const last = alarm.history.length ? alarm.history[alarm.history.length - 1].at : -Infinity;
  if (!Number.isFinite(at)) return refuse(alarm, 'time is not a number');
  if (at < last) return refuse(alarm, 'time is earlier than the last recorded transition');

  const from = alarm.state;
  let next: AlarmRecord = { ...alarm };
  let note: string | undefined;
  let by: string | undefined;
  let value: number | null | undefined;
  const hidden = OUT_OF_ANNUNCIATION.includes(from);

  switch (event.type) {
    case 'activate': {
      if (alarm.active) return refuse(alarm, 'already active');
      value = event.value;
      next = {
        ...next,
        active: true,
        raisedValue: event.value,
        worstValue: event.value,
        lastValue: event.value,
        message: event.message ?? null,
        activatedAt: at,
        clearedAt: null,
        acknowledgedAt: null,
        acknowledgedBy: null,
      };
      if (!hidden) next.state = 'unacknowledged';
      break;
    }
    case 'value': {
      if (!alarm.active) return refuse(alarm, 'not active');
      if (!Number.isFinite(event.value)) return refuse(alarm, 'value is not a number');
      value = event.value;
      next.lastValue = event.value;
      if (worse(alarm, event.value)) next.worstValue = event.value;
      break;
    }
    case 'clear': {
      if (!alarm.active) return refuse(alarm, 'not active');
      value = event.value ?? null;
      next = { ...next, active: false, clearedAt: at, lastValue: event.value ?? alarm.lastValue };
      if (from === 'unacknowledged') next.state = 'returned-unacknowledged';
      else if (from === 'acknowledged') next.state = 'normal';
      break;
    }
    case 'acknowledge': {
      if (hidden) return refuse(alarm, `cannot acknowledge while ${from}`);
      if (from === 'normal') return refuse(alarm, 'nothing to acknowledge');
      if (from === 'acknowledged') return refuse(alarm, 'already acknowledged');
      by = event.by;
      note = event.comment;
      next = { ...next, acknowledgedAt: at, acknowledgedBy: event.by ?? null, state: from === 'unacknowledged' ? 'acknowledged' : 'normal' };
      break;
    }
    case 'shelve': {
      if (from === 'shelved') return refuse(alarm, 'already shelved');
      if (from === 'suppressed-by-design' || from === 'out-of-service') return refuse(alarm, `cannot shelve while ${from}`);
      if (!Number.isInteger(event.minutes) || event.minutes < SHELVE_MIN_MINUTES || event.minutes > SHELVE_MAX_MINUTES) {
        return refuse(alarm, `shelve time must be a whole number of minutes from ${SHELVE_MIN_MINUTES} to ${SHELVE_MAX_MINUTES}`);
      }
      if (typeof event.reason !== 'string' || event.reason.trim() === '') return refuse(alarm, 'a reason is required to shelve');
      by = event.by;
      note = event.reason.trim();
      next = { ...next, state: 'shelved', shelvedUntil: at + event.minutes * 60_000, shelveReason: note };
      break;
    }
    case 'unshelve':
    case 'shelf-expired': {
      if (from !== 'shelved') return refuse(alarm, 'not shelved');
      if (event.type === 'shelf-expired' && at < (alarm.shelvedUntil ?? Infinity)) return refuse(alarm, 'shelf time has not run out');
      if (event.type === 'unshelve') by = event.by;
      next = { ...next, state: backInto(alarm), shelvedUntil: null, shelveReason: null };
      break;
    }
    case 'suppress': {
      if (from === 'suppressed-by-design') return refuse(alarm, 'already suppressed by design');
      if (from === 'shelved' || from === 'out-of-service') return refuse(alarm, `cannot suppress while ${from}`);
      note = event.reason;
      next.state = 'suppressed-by-design';
      break;
    }
    case 'unsuppress': {
      if (from !== 'suppressed-by-design') return refuse(alarm, 'not suppressed by design');
      next.state = backInto(alarm);
      break;
    }
    case 'remove-from-service': {
      if (from === 'out-of-service') return refuse(alarm, 'already out of service');
      if (typeof event.reason !== 'string' || event.reason.trim() === '') return refuse(alarm, 'a reason is required to take an alarm out of service');
      by = event.by;
      note = event.reason.trim();
      next = { ...next, state: 'out-of-service', outOfServiceReason: note, shelvedUntil: null, shelveReason: null };
      break;
    }
    case 'return-to-service': {
      if (from !== 'out-of-service') return refuse(alarm, 'not out of service');
      by = event.by;
      next = { ...next, state: backInto(alarm), outOfServiceReason: null };
      break;
    }
    default:
      return refuse(alarm, `unknown event ${(event as { type: string }).type}`);
  }

  const entry: AlarmHistoryEntry = { at, event: event.type, from, to: next.state };
  if (value !== undefined) entry.value = value;
  if (by !== undefined) entry.by = by;
  if (note !== undefined) entry.note = note;
  next.history = [...alarm.history, entry];
  return { ok: true, alarm: next };
}

/** Expire a shelf whose time has run out (call on each tick). Unchanged record when nothing is due. */
export function expireShelf(alarm: AlarmRecord, now: number): AlarmRecord {
  if (alarm.state !== 'shelved' || alarm.shelvedUntil === null || now < alarm.shelvedUntil) return alarm;
  const r = transition(alarm, { type: 'shelf-expired' }, Math.max(alarm.shelvedUntil, alarm.history.at(-1)?.at ?? -Infinity));
  return r.alarm;
}

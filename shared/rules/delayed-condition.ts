/**
 * On-delay / off-delay machine shared by the rules (OPC UA Part 9 / IEC 62541-9 Annex B,
 * ISA-18.2): an alarm activates only after its condition has held for the on-delay, and
 * returns to normal only after the return condition has held for the off-delay.
 * Between readings the last value is held (sample and hold), so the result does not
 * depend on how often ticks arrive and event times are exact.
 */
import { RuleEvent } from './rule-types';

/** What the latest value says: beyond the limit, back past limit - deadband, or in between. */
export type ConditionStatus = 'alarm' | 'normal' | 'between';

export interface DelayedState {
  active: boolean;
  /** Alarm condition true since (ms), while not active. */
  since: number | null;
  /** Return condition true since (ms), while active. */
  clearSince: number | null;
  heldValue: number | null;
  raisedValue: number | null;
  worstValue: number | null;
}

export interface DelayTimes {
  onDelayS?: number;
  offDelayS?: number;
}

export interface DelayMessages {
  raise: (value: number | null) => string;
  clear: (value: number | null) => string;
  /** Larger is worse for high rules, smaller for low rules. */
  worse: (a: number, b: number) => boolean;
}

export function initialDelayedState(): DelayedState {
  return { active: false, since: null, clearSince: null, heldValue: null, raisedValue: null, worstValue: null };
}

/**
 * A deadline reached at `t` (strictly after it when `before`). A module-level function, not a closure per call:
 * this runs for every reading of every rule, and the server's TypeScript loader names each inner function on
 * every call (esbuild keepNames), which cost more than the rule itself.
 */
function isDue(t: number, deadline: number, before: boolean): boolean {
  return before ? t > deadline : t >= deadline;
}

/** True when advanceDelays(st, t, ...) would complete a delay (so it has events to report). */
function anyDue(st: DelayedState, t: number, on: number, off: number, before: boolean): boolean {
  if (st.active) return st.clearSince !== null && isDue(t, st.clearSince + off, before);
  return st.since !== null && isDue(t, st.since + on, before);
}

/**
 * Let time pass to `t` with the held value: complete any on- or off-delay that has run out.
 * `before` (used when a new value arrives at t): the held value only counts strictly before t,
 * so a delay that would end exactly when a contrary reading arrives does not complete.
 */
export function advanceDelays(st: DelayedState, t: number, d: DelayTimes, m: DelayMessages, before = false): { state: DelayedState; events: RuleEvent[] } {
  const events: RuleEvent[] = [];
  let s = st;
  const on = (d.onDelayS ?? 0) * 1000;
  const off = (d.offDelayS ?? 0) * 1000;
  if (!s.active && s.since !== null && isDue(t, s.since + on, before)) {
    const at = s.since + on;
    s = { ...s, active: true, since: null, clearSince: null, raisedValue: s.heldValue, worstValue: s.heldValue };
    events.push({ kind: 'raise', ts: at, value: s.heldValue, message: m.raise(s.heldValue) });
  }
  if (s.active && s.clearSince !== null && isDue(t, s.clearSince + off, before)) {
    const at = s.clearSince + off;
    events.push({ kind: 'clear', ts: at, value: s.heldValue, message: m.clear(s.heldValue) });
    s = { ...s, active: false, since: null, clearSince: null };
  }
  return { state: s, events };
}

/** Apply a new evaluated value at `t`. */
export function applyStatus(
  st: DelayedState,
  t: number,
  status: ConditionStatus,
  value: number,
  d: DelayTimes,
  m: DelayMessages,
): { state: DelayedState; events: RuleEvent[] } {
  // The usual reading completes no delay: one new state and one (empty) event list, nothing more. This runs
  // for every reading of most rules, and the general path below allocated five objects and arrays each time.
  const on = (d.onDelayS ?? 0) * 1000;
  const off = (d.offDelayS ?? 0) * 1000;
  if (!anyDue(st, t, on, off, true)) {
    const s = withValue(st, t, status, value, m);
    return anyDue(s, t, on, off, false) ? advanceDelays(s, t, d, m) : { state: s, events: [] };
  }
  const first = advanceDelays(st, t, d, m, true);
  const s = withValue(first.state, t, status, value, m);
  const second = advanceDelays(s, t, d, m);
  return { state: second.state, events: [...first.events, ...second.events] };
}

/** A copy of the state holding `value`, with the condition's start or the return's start updated. */
function withValue(st: DelayedState, t: number, status: ConditionStatus, value: number, m: DelayMessages): DelayedState {
  const s = { ...st, heldValue: value };
  if (s.active) {
    if (s.worstValue === null || m.worse(value, s.worstValue)) s.worstValue = value;
    s.clearSince = status === 'normal' ? (s.clearSince ?? t) : null;
  } else {
    s.since = status === 'alarm' ? (s.since ?? t) : null;
  }
  return s;
}

/** The rule no longer applies (gated off by engine state): forget pending delays, clear an active alarm now. */
export function forceNormal(st: DelayedState, t: number, d: DelayTimes, m: DelayMessages, why: string): { state: DelayedState; events: RuleEvent[] } {
  const due = anyDue(st, t, (d.onDelayS ?? 0) * 1000, (d.offDelayS ?? 0) * 1000, true);
  const first = due ? advanceDelays(st, t, d, m, true) : null;
  const events = first ? [...first.events] : [];
  let s = first ? first.state : st;
  if (s.active) events.push({ kind: 'clear', ts: t, value: s.heldValue, message: `${m.clear(s.heldValue)} (${why})` });
  s = { ...s, active: false, since: null, clearSince: null };
  return { state: s, events };
}

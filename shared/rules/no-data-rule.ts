/**
 * No data: the channel has been silent longer than `factor` times its usual interval.
 * The usual interval is learned as the median of recent intervals between readings (robust to
 * the odd burst or gap), never taken below `minSilenceS`. Any arriving reading counts as data,
 * bad quality included: the device is talking. Once a few intervals are known (LEARNED_ENOUGH),
 * gaps that raised the alarm are not learned, so outages do not teach the rule to expect them.
 */
import { RuleEvent, RuleInput, StepResult, isReading, median, fmt } from './rule-types';

export interface NoDataRuleParams {
  /** Silence longer than factor x usual interval raises (default 5). */
  factor?: number;
  /** Never raise for a silence shorter than this (seconds). */
  minSilenceS: number;
  /** Intervals remembered for the median (default 20). */
  historySize?: number;
  /** Expected interval before any is learned (seconds); default: only the minimum applies. */
  initialIntervalS?: number;
  label?: string;
}

export interface NoDataRuleState {
  lastTs: number | null;
  intervalsMs: number[];
  active: boolean;
}

/** `startTs`: count silence from here even before the first reading (e.g. when the device was registered). */
export const LEARNED_ENOUGH = 3;

export function initialNoDataState(startTs: number | null = null): NoDataRuleState {
  return { lastTs: startTs, intervalsMs: [], active: false };
}

/** Silence (ms) after which the rule raises, with the current learning. */
export function silenceLimitMs(state: NoDataRuleState, params: NoDataRuleParams): number {
  const min = params.minSilenceS * 1000;
  const usual = state.intervalsMs.length ? median(state.intervalsMs) : (params.initialIntervalS ?? 0) * 1000;
  return Math.max(min, (params.factor ?? 5) * usual);
}

/**
 * The source has declared its data lost (a Sparkplug death certificate): raise now, not after the
 * silence limit. The next reading clears it as after any silence.
 */
export function lostNoData(state: NoDataRuleState, at: number, params: NoDataRuleParams): StepResult<NoDataRuleState> {
  if (state.active) return { state, events: [] };
  const label = params.label ?? 'Channel';
  return { state: { ...state, active: true }, events: [{ kind: 'raise', ts: at, value: null, message: `${label}: the gateway reported its data lost` }] };
}

export function stepNoData(state: NoDataRuleState, input: RuleInput, params: NoDataRuleParams): StepResult<NoDataRuleState> {
  const label = params.label ?? 'Channel';
  const events: RuleEvent[] = [];
  const limit = silenceLimitMs(state, params);
  let s = state;
  // A reading that ends the very first gap (nothing learned, no expected interval) is not a silence: with
  // history sent at, say, 300 s steps, the first interval is simply the first thing learned. Clock ticks still judge it.
  const judged = !isReading(input) || s.intervalsMs.length > 0 || params.initialIntervalS !== undefined;
  if (judged && !s.active && s.lastTs !== null && input.ts - s.lastTs > limit) {
    const at = s.lastTs + limit;
    events.push({ kind: 'raise', ts: at, value: null, message: `${label}: no data for more than ${fmt(limit / 1000, 0)} s` });
    s = { ...s, active: true };
  }
  if (!isReading(input)) return { state: s, events };
  let intervals = s.intervalsMs;
  if (s.lastTs !== null && input.ts > s.lastTs) {
    const gap = input.ts - s.lastTs;
    if (!s.active || intervals.length < LEARNED_ENOUGH) intervals = [...intervals, gap].slice(-(params.historySize ?? 20));
  }
  if (s.active) {
    const silentS = s.lastTs === null ? 0 : (input.ts - s.lastTs) / 1000;
    events.push({ kind: 'clear', ts: input.ts, value: null, message: `${label}: data again after ${fmt(silentS, 0)} s` });
  }
  return { state: { lastTs: Math.max(input.ts, s.lastTs ?? -Infinity), intervalsMs: intervals, active: false }, events };
}

/**
 * Coolant conductivity: alarm when above the baseline by `risePercent`, or above an absolute
 * limit. The baseline is the median of the first `baselineCount` good readings at or after
 * `baselineFrom` (the last coolant change); readings before it are ignored. A new
 * `baselineFrom` starts a new baseline. Until the baseline is known only the absolute limit applies.
 */
import { DelayedState, DelayMessages, initialDelayedState, advanceDelays, applyStatus, ConditionStatus } from './delayed-condition';
import { RuleInput, StepResult, isReading, isGood, median, fmt } from './rule-types';

export interface ConductivityRuleParams {
  /** ms since epoch of the last coolant change. */
  baselineFrom: number;
  /** Default 5. */
  baselineCount?: number;
  /** Alarm when value > baseline x (1 + risePercent/100). */
  risePercent?: number;
  /** Alarm when value > this (µS/cm). */
  absoluteLimit?: number;
  /** Return when value <= limit - deadband (µS/cm). */
  deadband?: number;
  onDelayS?: number;
  offDelayS?: number;
}

export interface ConductivityRuleState extends DelayedState {
  baselineFrom: number | null;
  baselineSamples: number[];
  baseline: number | null;
}

export function initialConductivityState(): ConductivityRuleState {
  return { ...initialDelayedState(), baselineFrom: null, baselineSamples: [], baseline: null };
}

/** The effective limit now: the lower of the baseline-relative and absolute limits, or null when neither is known. */
export function conductivityLimit(baseline: number | null, p: ConductivityRuleParams): number | null {
  const limits: number[] = [];
  if (baseline !== null && p.risePercent !== undefined) limits.push(baseline * (1 + p.risePercent / 100));
  if (p.absoluteLimit !== undefined) limits.push(p.absoluteLimit);
  return limits.length ? Math.min(...limits) : null;
}

/** Messages per params object (stable per engine and rule), built once; `baseline` is set before each use. */
interface ConductivityMessages extends DelayMessages {
  baseline: number | null;
}
const messageCache = new WeakMap<ConductivityRuleParams, ConductivityMessages>();

function messages(params: ConductivityRuleParams, baseline: number | null): DelayMessages {
  let m = messageCache.get(params);
  if (!m) messageCache.set(params, (m = buildMessages(params)));
  m.baseline = baseline;
  return m;
}

function buildMessages(params: ConductivityRuleParams): ConductivityMessages {
  const m: ConductivityMessages = {
    baseline: null,
    raise: (v) => {
      const base = m.baseline;
      const lim = conductivityLimit(base, params);
      const rel = base !== null && v !== null ? ` (+${fmt(((v - base) / base) * 100, 0)} % on baseline ${fmt(base, 0)} µS/cm)` : '';
      return `Coolant conductivity ${fmt(v, 0)} µS/cm above ${fmt(lim, 0)} µS/cm${rel}`;
    },
    clear: (v) => `Coolant conductivity back to ${fmt(v, 0)} µS/cm`,
    worse: (a, b) => a > b,
  };
  return m;
}

function merge(s: ConductivityRuleState, d: DelayedState): ConductivityRuleState {
  return { ...s, ...d };
}

export function stepConductivity(state: ConductivityRuleState, input: RuleInput, params: ConductivityRuleParams): StepResult<ConductivityRuleState> {
  let s: ConductivityRuleState =
    state.baselineFrom === params.baselineFrom ? state : { ...state, baselineFrom: params.baselineFrom, baselineSamples: [], baseline: null };
  if (!isReading(input) || !isGood(input) || input.ts < params.baselineFrom) {
    const r = advanceDelays(s, input.ts, params, messages(params, s.baseline));
    return { state: merge(s, r.state), events: r.events };
  }
  if (s.baseline === null) {
    const samples = [...s.baselineSamples, input.value];
    const n = params.baselineCount ?? 5;
    s = { ...s, baselineSamples: samples, baseline: samples.length >= n ? median(samples) : null };
  }
  const limit = conductivityLimit(s.baseline, params);
  if (limit === null) {
    const r = advanceDelays(s, input.ts, params, messages(params, s.baseline));
    return { state: merge(s, r.state), events: r.events };
  }
  const db = Math.max(0, params.deadband ?? 0);
  const status: ConditionStatus = input.value > limit ? 'alarm' : input.value <= limit - db ? 'normal' : 'between';
  const r = applyStatus(s, input.ts, status, input.value, params, messages(params, s.baseline));
  return { state: merge(s, r.state), events: r.events };
}

/**
 * High or low limit with deadband, on-delay and off-delay.
 * Semantics as OPC UA Part 9 (IEC 62541-9) Annex B and ISA-18.2: a high alarm's condition is
 * value > limit; it must hold for the on-delay before the alarm activates. The alarm returns to
 * normal only when the value is back at or below limit - deadband (high) / at or above
 * limit + deadband (low) and stays there for the off-delay. Bad-quality readings are ignored.
 */
import { DelayedState, DelayMessages, ConditionStatus, initialDelayedState, advanceDelays, applyStatus, forceNormal } from './delayed-condition';
import { RuleInput, RunGate, StepResult, isReading, isGood, gateOpen, gateText, fmt } from './rule-types';

export interface LimitRuleParams extends RunGate {
  direction: 'high' | 'low';
  limit: number;
  /** Hysteresis in the channel's unit (>= 0). */
  deadband?: number;
  onDelayS?: number;
  offDelayS?: number;
  /** For messages, e.g. 'Coolant temperature', '°C'. */
  label?: string;
  unit?: string;
}

export type LimitRuleState = DelayedState;

export function initialLimitState(): LimitRuleState {
  return initialDelayedState();
}

export function limitStatus(value: number, p: LimitRuleParams): ConditionStatus {
  const db = Math.max(0, p.deadband ?? 0);
  if (p.direction === 'high') {
    if (value > p.limit) return 'alarm';
    return value <= p.limit - db ? 'normal' : 'between';
  }
  if (value < p.limit) return 'alarm';
  return value >= p.limit + db ? 'normal' : 'between';
}

/** Per params object (stable per engine and rule): built once, not per reading. */
const messageCache = new WeakMap<LimitRuleParams, DelayMessages>();

function messages(p: LimitRuleParams): DelayMessages {
  let m = messageCache.get(p);
  if (!m) messageCache.set(p, (m = buildMessages(p)));
  return m;
}

function buildMessages(p: LimitRuleParams): DelayMessages {
  const label = p.label ?? 'Value';
  const unit = p.unit ? ` ${p.unit}` : '';
  const word = p.direction === 'high' ? 'above' : 'below';
  return {
    raise: (v) => `${label} ${fmt(v)}${unit} ${word} ${p.direction} limit ${p.limit}${unit}`,
    clear: (v) => `${label} back to normal at ${fmt(v)}${unit}`,
    worse: (a, b) => (p.direction === 'high' ? a > b : a < b),
  };
}

export function stepLimit(state: LimitRuleState, input: RuleInput, params: LimitRuleParams): StepResult<LimitRuleState> {
  const m = messages(params);
  if (!isReading(input)) return advanceDelays(state, input.ts, params, m);
  if (!isGood(input)) return advanceDelays(state, input.ts, params, m);
  if (!gateOpen(params, input.running)) return forceNormal(state, input.ts, params, m, gateText(params));
  return applyStatus(state, input.ts, limitStatus(input.value, params), input.value, params, m);
}

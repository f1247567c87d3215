/**
 * Rate of change over a time window: least-squares slope of the good readings in the last
 * `windowS` seconds, in units per minute. Rising faster than `ratePerMin` (e.g. coolant
 * temperature while running) or falling faster (e.g. pressure while stopped: a leak).
 * The alarm needs the condition for the on-delay; it clears when the slope is back within
 * rate - deadband for the off-delay.
 */
import { DelayedState, DelayMessages, initialDelayedState, advanceDelays, applyStatus, forceNormal, ConditionStatus } from './delayed-condition';
import { RuleInput, RunGate, StepResult, isReading, isGood, gateOpen, gateText, fmt } from './rule-types';

export interface RateRuleParams extends RunGate {
  direction: 'rising' | 'falling';
  /** Threshold, positive, in units per minute. */
  ratePerMin: number;
  windowS: number;
  /** Slope hysteresis in units per minute. */
  deadbandPerMin?: number;
  onDelayS?: number;
  offDelayS?: number;
  /** Fewest readings in the window for a slope (default 3). */
  minPoints?: number;
  /** The readings must span at least this share of the window (default 0.5). */
  minSpanFraction?: number;
  label?: string;
  unit?: string;
}

export interface RateRuleState extends DelayedState {
  window: { ts: number; value: number }[];
  slopePerMin: number | null;
}

export function initialRateState(): RateRuleState {
  return { ...initialDelayedState(), window: [], slopePerMin: null };
}

/** Ordinary least-squares slope (value per ms) of (ts, value); null for fewer than 2 distinct times. */
export function leastSquaresSlope(points: readonly { ts: number; value: number }[]): number | null {
  const n = points.length;
  if (n < 2) return null;
  const t0 = points[0].ts; // centre-free offsets keep the sums well conditioned
  let st = 0,
    sv = 0;
  for (const p of points) {
    st += p.ts - t0;
    sv += p.value;
  }
  const mt = st / n,
    mv = sv / n;
  let num = 0,
    den = 0;
  for (const p of points) {
    const dt = p.ts - t0 - mt;
    num += dt * (p.value - mv);
    den += dt * dt;
  }
  return den === 0 ? null : num / den;
}

/** Per params object (stable per engine and rule): built once, not per reading. */
const messageCache = new WeakMap<RateRuleParams, DelayMessages>();

function messages(p: RateRuleParams): DelayMessages {
  let m = messageCache.get(p);
  if (!m) messageCache.set(p, (m = buildMessages(p)));
  return m;
}

function keep(state: RateRuleState, s: DelayedState, extra: Partial<RateRuleState> = {}): RateRuleState {
  return { ...state, ...s, ...extra };
}

function buildMessages(p: RateRuleParams): DelayMessages {
  const label = p.label ?? 'Value';
  const unit = p.unit ?? 'units';
  const word = p.direction === 'rising' ? 'rising' : 'falling';
  return {
    raise: (v) => `${label} ${word} at ${fmt(v === null ? null : Math.abs(v), 2)} ${unit}/min (limit ${p.ratePerMin} ${unit}/min over ${p.windowS} s)`,
    clear: (v) => `${label} rate back to normal (${fmt(v, 2)} ${unit}/min)`,
    worse: (a, b) => (p.direction === 'rising' ? a > b : a < b),
  };
}

export function rateStatus(slopePerMin: number, p: RateRuleParams): ConditionStatus {
  const db = Math.max(0, p.deadbandPerMin ?? 0);
  const s = p.direction === 'rising' ? slopePerMin : -slopePerMin;
  if (s > p.ratePerMin) return 'alarm';
  return s <= p.ratePerMin - db ? 'normal' : 'between';
}

export function stepRate(state: RateRuleState, input: RuleInput, params: RateRuleParams): StepResult<RateRuleState> {
  const m = messages(params);
  if (!isReading(input) || !isGood(input)) {
    const r = advanceDelays(state, input.ts, params, m);
    return { state: keep(state, r.state), events: r.events };
  }
  if (!gateOpen(params, input.running)) {
    // A window that spans a start or a stop mixes two regimes: start again.
    const r = forceNormal(state, input.ts, params, m, gateText(params));
    return { state: keep(state, r.state, { window: [], slopePerMin: null }), events: r.events };
  }
  const from = input.ts - params.windowS * 1000;
  // a plain loop, not filter with an arrow: the server's TypeScript loader (esbuild keepNames) wraps and names
  // an inner function on every call, which showed in the flood's profile
  const window: { ts: number; value: number }[] = [];
  for (const p of state.window) if (p.ts >= from && p.ts < input.ts) window.push(p);
  window.push({ ts: input.ts, value: input.value });
  const span = window[window.length - 1].ts - window[0].ts;
  const enough = window.length >= (params.minPoints ?? 3) && span >= (params.minSpanFraction ?? 0.5) * params.windowS * 1000;
  const slope = enough ? leastSquaresSlope(window) : null;
  const slopePerMin = slope === null ? null : slope * 60000;
  if (slopePerMin === null) {
    const r = advanceDelays(state, input.ts, params, m);
    return { state: keep(state, r.state, { window, slopePerMin: null }), events: r.events };
  }
  const r = applyStatus(state, input.ts, rateStatus(slopePerMin, params), slopePerMin, params, m);
  return { state: keep(state, r.state, { window, slopePerMin }), events: r.events };
}

/**
 * Boiling margin: boiling point of the engine's water-glycol mix at the measured system pressure
 * minus the coolant temperature. Alarm when the margin is below `marginC` for the on-delay;
 * back to normal when it is at least marginC + deadbandC for the off-delay.
 * Fed readings of two channels; the latest good pressure is paired with each temperature.
 * Absolute pressure = gauge + the site's atmospheric pressure (`atmosphereKpa`, from its elevation by the
 * ICAO standard atmosphere; sea level when not given), so the margin is right at altitude.
 * Without a usable pressure (none yet, or older than `maxPressureAgeS`) the rule uses the cap's rating
 * only while the engine runs and the coolant is warm (at least `warmAboveC`), when a sound system holds
 * near it, and says so in the alarm text; otherwise it gives no verdict: assuming an open system (0 kPa)
 * would alarm inside the normal running band of a water-only engine.
 */
import { boilingPointC as defaultBoilingPointC } from '../coolant/boiling-point';
import { ConcentrationBasis, GlycolType } from '../coolant/glycol';
import { DelayedState, DelayMessages, initialDelayedState, advanceDelays, applyStatus, forceNormal, ConditionStatus } from './delayed-condition';
import { RuleReading, RunGate, StepResult, isReading, isGood, gateOpen, gateText, fmt } from './rule-types';

export type BoilingPointFn = (gaugeKpa: number, glycol: GlycolType, percent: number, basis: ConcentrationBasis, atmosphereKpa?: number) => number;

export interface BoilingMarginReading extends RuleReading {
  channel: 'coolant_temp' | 'coolant_pressure';
}

export type BoilingMarginInput = BoilingMarginReading | { ts: number };

export interface BoilingMarginParams extends RunGate {
  /** Alarm when the margin (°C) falls below this. */
  marginC: number;
  deadbandC?: number;
  onDelayS?: number;
  offDelayS?: number;
  glycol: GlycolType;
  /** 0 = plain water. */
  glycolPercent: number;
  basis: ConcentrationBasis;
  /** Pressure older than this (relative to the temperature reading) is not used. Default 60 s. */
  maxPressureAgeS?: number;
  /** Atmospheric pressure at the site (kPa absolute); default 101.325 (sea level). */
  atmosphereKpa?: number;
  /** Rated cap pressure (kPa gauge), used without a pressure reading while running and warm; null: unknown. */
  capPressureKpa?: number | null;
  /** "Warm" for the cap assumption (°C, default 80). */
  warmAboveC?: number;
  /** Override of the boiling point function (default: shared/coolant/boiling-point.ts, IAPWS-IF97 + Raoult). */
  boilingPointC?: BoilingPointFn;
}

export interface BoilingMarginState extends DelayedState {
  pressure: { ts: number; value: number } | null;
  lastMarginC: number | null;
  lastBoilingPointC: number | null;
  /** True when the last margin assumed the cap's rating for want of a pressure reading. */
  assumedPressure: boolean;
}

export function initialBoilingMarginState(): BoilingMarginState {
  return { ...initialDelayedState(), pressure: null, lastMarginC: null, lastBoilingPointC: null, assumedPressure: false };
}

export function boilingMarginStatus(marginC: number, p: BoilingMarginParams): ConditionStatus {
  if (marginC < p.marginC) return 'alarm';
  return marginC >= p.marginC + Math.max(0, p.deadbandC ?? 0) ? 'normal' : 'between';
}

/** Per params object (stable per engine and rule) and pressure basis: built once, not per reading. */
const messageCache = new WeakMap<BoilingMarginParams, [DelayMessages, DelayMessages]>();

function messages(p: BoilingMarginParams, assumed: boolean): DelayMessages {
  let pair = messageCache.get(p);
  if (!pair) messageCache.set(p, (pair = [buildMessages(p, false), buildMessages(p, true)]));
  return pair[assumed ? 1 : 0];
}

function merge(state: BoilingMarginState, s: DelayedState, extra: Partial<BoilingMarginState> = {}): BoilingMarginState {
  return { ...state, ...s, ...extra };
}

function buildMessages(p: BoilingMarginParams, assumed: boolean): DelayMessages {
  return {
    raise: (v) =>
      `Boiling margin ${fmt(v)} °C below ${p.marginC} °C${assumed ? ` (no pressure reading: the cap's rating of ${fmt(p.capPressureKpa ?? 0, 0)} kPa assumed, as the engine runs warm; a leaking cap or low coolant would leave less margin)` : ''}`,
    clear: (v) => `Boiling margin back to ${fmt(v)} °C`,
    worse: (a, b) => a < b,
  };
}

export function stepBoilingMargin(state: BoilingMarginState, input: BoilingMarginInput, params: BoilingMarginParams): StepResult<BoilingMarginState> {
  // the messages say whether the cap's rating stood in for a pressure reading: as the state had it, until this reading decides
  const m = messages(params, state.assumedPressure);
  if (!isReading(input) || !isGood(input as BoilingMarginReading)) {
    const r = advanceDelays(state, input.ts, params, m);
    return { state: merge(state, r.state), events: r.events };
  }
  const reading = input as BoilingMarginReading;
  if (reading.channel === 'coolant_pressure') {
    const r = advanceDelays(state, reading.ts, params, m);
    return { state: merge(state, r.state, { pressure: { ts: reading.ts, value: reading.value } }), events: r.events };
  }
  if (!gateOpen(params, reading.running)) {
    const r = forceNormal(state, reading.ts, params, m, gateText(params));
    return { state: merge(state, r.state), events: r.events };
  }
  const maxAge = (params.maxPressureAgeS ?? 60) * 1000;
  const p = state.pressure;
  const usable = p !== null && Math.abs(reading.ts - p.ts) <= maxAge;
  const cap = params.capPressureKpa;
  const capUsable = !usable && reading.running === true && typeof cap === 'number' && cap > 0 && reading.value >= (params.warmAboveC ?? 80);
  if (!usable && !capUsable) {
    // no pressure and no safe assumption: no verdict (delays keep running on the held value)
    const r = advanceDelays(state, reading.ts, params, m);
    return { state: merge(state, r.state), events: r.events };
  }
  const assumed = !usable;
  const gauge = usable ? p!.value : cap!;
  let bp: number;
  try {
    bp = (params.boilingPointC ?? defaultBoilingPointC)(gauge, params.glycol, params.glycolPercent, params.basis, params.atmosphereKpa);
  } catch {
    // Outside the property equations: no verdict from this reading, delays keep running.
    const r = advanceDelays(state, reading.ts, params, m);
    return { state: merge(state, r.state), events: r.events };
  }
  const margin = bp - reading.value;
  const r = applyStatus(state, reading.ts, boilingMarginStatus(margin, params), margin, params, messages(params, assumed));
  return { state: merge(state, r.state, { lastMarginC: margin, lastBoilingPointC: bp, assumedPressure: assumed }), events: r.events };
}

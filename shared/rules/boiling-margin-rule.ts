/**
 * Boiling margin: boiling point of the engine's water-glycol mix at the measured system pressure
 * minus the coolant temperature. Alarm when the margin is below `marginC` for the on-delay;
 * back to normal when it is at least marginC + deadbandC for the off-delay.
 * Fed readings of two channels; the latest good pressure is paired with each temperature.
 * Without a usable pressure (none yet, or older than `maxPressureAgeS`) 0 kPa gauge is assumed:
 * the boiling point of the open system, lower than at any positive cap pressure, so the margin
 * errs on the side of an early alarm (the message says so).
 */
import { boilingPointC as defaultBoilingPointC } from '../coolant/boiling-point';
import { ConcentrationBasis, GlycolType } from '../coolant/glycol';
import { DelayedState, DelayMessages, initialDelayedState, advanceDelays, applyStatus, forceNormal, ConditionStatus } from './delayed-condition';
import { RuleInput, RuleReading, RunGate, StepResult, isReading, isGood, gateOpen, gateText, fmt } from './rule-types';

export type BoilingPointFn = (gaugeKpa: number, glycol: GlycolType, percent: number, basis: ConcentrationBasis) => number;

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
  /** Override of the boiling point function (default: shared/coolant/boiling-point.ts, IAPWS-IF97 + Raoult). */
  boilingPointC?: BoilingPointFn;
}

export interface BoilingMarginState extends DelayedState {
  pressure: { ts: number; value: number } | null;
  lastMarginC: number | null;
  lastBoilingPointC: number | null;
  /** True when the last margin assumed 0 kPa gauge for want of a pressure reading. */
  assumedPressure: boolean;
}

export function initialBoilingMarginState(): BoilingMarginState {
  return { ...initialDelayedState(), pressure: null, lastMarginC: null, lastBoilingPointC: null, assumedPressure: false };
}

export function boilingMarginStatus(marginC: number, p: BoilingMarginParams): ConditionStatus {
  if (marginC < p.marginC) return 'alarm';
  return marginC >= p.marginC + Math.max(0, p.deadbandC ?? 0) ? 'normal' : 'between';
}

function messages(p: BoilingMarginParams, assumed: () => boolean): DelayMessages {
  return {
    raise: (v) => `Boiling margin ${fmt(v)} °C below ${p.marginC} °C${assumed() ? ' (no pressure reading: 0 kPa gauge assumed)' : ''}`,
    clear: (v) => `Boiling margin back to ${fmt(v)} °C`,
    worse: (a, b) => a < b,
  };
}

export function stepBoilingMargin(state: BoilingMarginState, input: BoilingMarginInput, params: BoilingMarginParams): StepResult<BoilingMarginState> {
  let assumed = state.assumedPressure;
  const m = messages(params, () => assumed);
  const merge = (s: DelayedState, extra: Partial<BoilingMarginState> = {}): BoilingMarginState => ({ ...state, ...s, ...extra });
  if (!isReading(input) || !isGood(input as BoilingMarginReading)) {
    const r = advanceDelays(state, input.ts, params, m);
    return { state: merge(r.state), events: r.events };
  }
  const reading = input as BoilingMarginReading;
  if (reading.channel === 'coolant_pressure') {
    const r = advanceDelays(state, reading.ts, params, m);
    return { state: merge(r.state, { pressure: { ts: reading.ts, value: reading.value } }), events: r.events };
  }
  if (!gateOpen(params, reading.running)) {
    const r = forceNormal(state, reading.ts, params, m, gateText(params));
    return { state: merge(r.state), events: r.events };
  }
  const maxAge = (params.maxPressureAgeS ?? 60) * 1000;
  const p = state.pressure;
  const usable = p !== null && Math.abs(reading.ts - p.ts) <= maxAge;
  assumed = !usable;
  const gauge = usable ? p!.value : 0;
  let bp: number;
  try {
    bp = (params.boilingPointC ?? defaultBoilingPointC)(gauge, params.glycol, params.glycolPercent, params.basis);
  } catch {
    // Outside the property equations: no verdict from this reading, delays keep running.
    const r = advanceDelays(state, reading.ts, params, m);
    return { state: merge(r.state), events: r.events };
  }
  const margin = bp - reading.value;
  const r = applyStatus(state, reading.ts, boilingMarginStatus(margin, params), margin, params, m);
  return { state: merge(r.state, { lastMarginC: margin, lastBoilingPointC: bp, assumedPressure: assumed }), events: r.events };
}

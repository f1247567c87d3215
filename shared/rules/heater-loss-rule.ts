/**
 * Jacket-water heater not holding: a stopped engine with a heater should sit at the heater's setpoint
 * (the heater switches on and off around it). When its coolant is below setpoint - `belowByC` and has
 * fallen steadily by at least `minDropC` over `windowS`, the heater is not heating (failed, breaker
 * tripped, switched off, or a blocked hose). Found long before the engine is too cold to start.
 * Clears when the coolant is back within `belowByC - 1` of the setpoint or the engine runs.
 * Without a heater setpoint the rule says nothing. One point a minute is kept, so the state stays small.
 */
import { RuleEvent, RuleInput, StepResult, isReading, isGood, fmt } from './rule-types';

export interface HeaterLossParams {
  /** The engine's heater setpoint (°C); null: no heater, nothing to watch. */
  heaterSetpointC: number | null;
  /** Below the setpoint by at least this (°C) before a fall counts (default 3). */
  belowByC?: number;
  /** Fallen at least this much (°C) over the window (default 2). */
  minDropC?: number;
  /** Window (s, default 1800). */
  windowS?: number;
  /** A rise of more than this (°C) between successive minutes means it is not a steady fall (default 0.3). */
  riseToleranceC?: number;
}

interface Point {
  ts: number;
  value: number;
}

export interface HeaterLossState {
  points: Point[];
  active: boolean;
}

export function initialHeaterLossState(): HeaterLossState {
  return { points: [], active: false };
}

const MINUTE = 60_000;

export function stepHeaterLoss(state: HeaterLossState, input: RuleInput, p: HeaterLossParams): StepResult<HeaterLossState> {
  const events: RuleEvent[] = [];
  if (!isReading(input) || !isGood(input) || p.heaterSetpointC === null || !Number.isFinite(p.heaterSetpointC)) return { state, events };
  const sp = p.heaterSetpointC;
  const below = p.belowByC ?? 3;
  if (input.running !== false) {
    if (state.active)
      events.push({ kind: 'clear', ts: input.ts, value: input.value, message: 'Jacket water no longer watched for a heater fault (engine running)' });
    return { state: initialHeaterLossState(), events };
  }
  const last = state.points[state.points.length - 1];
  if (last && input.ts <= last.ts) return { state, events };
  const windowMs = (p.windowS ?? 1800) * 1000;
  // one point a minute: replace the newest point inside the same minute
  const points = last && input.ts - last.ts < MINUTE && state.points.length > 1 ? state.points.slice(0, -1) : [...state.points];
  points.push({ ts: input.ts, value: input.value });
  while (points.length > 2 && input.ts - points[1].ts >= windowMs) points.shift();
  let active = state.active;
  if (active && input.value >= sp - below + 1) {
    active = false;
    events.push({ kind: 'clear', ts: input.ts, value: input.value, message: `Jacket water back near the heater setpoint (${fmt(input.value)} °C)` });
  }
  if (!active && input.value < sp - below && input.ts - points[0].ts >= windowMs) {
    const drop = points[0].value - input.value;
    const tol = p.riseToleranceC ?? 0.3;
    const steady = points.every((pt, i) => i === 0 || pt.value <= points[i - 1].value + tol);
    if (drop >= (p.minDropC ?? 2) && steady) {
      active = true;
      const mins = (input.ts - points[0].ts) / MINUTE;
      events.push({
        kind: 'raise',
        ts: input.ts,
        value: input.value,
        message: `Jacket water of the stopped engine falling steadily: ${fmt(input.value)} °C, down ${fmt(drop)} °C in ${fmt(mins, 0)} min, below the heater setpoint of ${fmt(sp, 0)} °C (heater off, breaker tripped or heater failed?)`,
      });
    }
  }
  return { state: { points, active }, events };
}

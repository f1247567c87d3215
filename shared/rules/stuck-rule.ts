/**
 * Stuck value: while the engine runs, the reading has not moved out of a band of width
 * `epsilon` for `durationS`. "Not moved since" is measured from the last reading that lay
 * outside the band of the present run (or the run's first reading), using sliding min/max
 * queues so the state stays small however long the value is flat. Clears as soon as the value
 * moves or the engine stops (a stopped engine may sit at one temperature for days).
 */
import { RuleEvent, RuleInput, StepResult, isReading, isGood, fmt } from './rule-types';

export interface StuckRuleParams {
  /** Largest range (max - min) still counted as "not moving". */
  epsilon: number;
  durationS: number;
  /** Default true: evaluate only while running. */
  onlyWhenRunning?: boolean;
  label?: string;
  unit?: string;
}

interface Point { ts: number; value: number }

export interface StuckRuleState {
  /** Start of the flat run (ms), null when no run. */
  runStart: number | null;
  maxQ: Point[];
  minQ: Point[];
  active: boolean;
}

export function initialStuckState(): StuckRuleState {
  return { runStart: null, maxQ: [], minQ: [], active: false };
}

export function stepStuck(state: StuckRuleState, input: RuleInput, params: StuckRuleParams): StepResult<StuckRuleState> {
  const label = params.label ?? 'Value';
  const unit = params.unit ? ` ${params.unit}` : '';
  const events: RuleEvent[] = [];
  if (!isReading(input) || !isGood(input)) return { state, events };
  const gated = (params.onlyWhenRunning ?? true) && input.running !== true;
  if (gated) {
    if (state.active) events.push({ kind: 'clear', ts: input.ts, value: input.value, message: `${label}: no longer checked for a stuck value (engine not running)` });
    return { state: initialStuckState(), events };
  }
  const lastTs = state.maxQ.length ? state.maxQ[state.maxQ.length - 1].ts : null;
  if (lastTs !== null && input.ts <= lastTs) return { state, events }; // out of order or duplicate time
  const p = { ts: input.ts, value: input.value };
  const maxQ = [...state.maxQ];
  const minQ = [...state.minQ];
  while (maxQ.length && maxQ[maxQ.length - 1].value <= p.value) maxQ.pop();
  maxQ.push(p);
  while (minQ.length && minQ[minQ.length - 1].value >= p.value) minQ.pop();
  minQ.push(p);
  let runStart = state.runStart ?? p.ts;
  let moved = false;
  while (maxQ[0].value - minQ[0].value > params.epsilon) {
    // Drop the older extreme: the run now starts at it (the last reading outside the new band).
    const older = maxQ[0].ts <= minQ[0].ts ? maxQ : minQ;
    runStart = older.shift()!.ts;
    moved = true;
    while (maxQ.length && maxQ[0].ts <= runStart) maxQ.shift();
    while (minQ.length && minQ[0].ts <= runStart) minQ.shift();
  }
  let active = state.active;
  if (active && moved) {
    events.push({ kind: 'clear', ts: p.ts, value: p.value, message: `${label} moving again (${fmt(p.value, 2)}${unit})` });
    active = false;
  }
  if (!active && p.ts - runStart >= params.durationS * 1000) {
    active = true;
    events.push({
      kind: 'raise', ts: p.ts, value: p.value,
      message: `${label} stuck at ${fmt(p.value, 2)}${unit} for ${fmt((p.ts - runStart) / 1000, 0)} s while running (sensor or wiring?)`,
    });
  }
  return { state: { runStart, maxQ, minQ, active }, events };
}

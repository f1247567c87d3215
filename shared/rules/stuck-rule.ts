/**
 * Stuck value: the reading has not moved out of a band for `durationS` although the engine's
 * condition changed meanwhile (a start, a stop, or a load change seen in speed or pressure).
 * A healthy sensor at steady load may well repeat one value for a long time, above all one that
 * reports whole degrees, so a flat value alone proves nothing; a flat value through a start does.
 *
 * The band is the larger of `epsilon` and the sensor's resolution: the `resolution` parameter when
 * set (per engine and channel, through the engine's rule override), otherwise the coarsest step
 * that every recent value lies on (whole degrees, halves, tenths, ...).
 * "Not moved since" is measured from the last reading that lay outside the band (sliding min/max
 * queues keep the state small however long the value is flat). Clears as soon as the value moves.
 *
 * The state is updated in place and returned (the queues are ring buffers, nothing is copied per
 * reading): keep only the state returned last, as the server's evaluator does. It is plain data, so a
 * JSON copy of it is a snapshot that can be stepped on.
 *
 * Inputs: readings of the watched channel, plus context readings marked `aux: 'speed' | 'pressure'`
 * (engine speed in rpm, coolant pressure in kPa). `running` on the watched readings tells starts and stops.
 */
import { RuleEvent, RuleInput, StepResult, isReading, isGood, fmt, type RuleReading } from './rule-types';
import { createPointDeque, popBack, popFront, pushBack, tsAt, valueAt, type PointDeque } from './point-deque';

export interface StuckRuleParams {
  /** Smallest range (max - min) counted as "moving"; widened to the sensor's resolution. */
  epsilon: number;
  /** How long the value must stay flat after the engine's condition changed. */
  durationS: number;
  /** Sensor resolution in the channel's unit; when 0 or absent it is learned from recent values. */
  resolution?: number | null;
  /** A change of engine speed this large counts as a change of condition (rpm). */
  speedChangeRpm?: number;
  /** A change of coolant pressure this large counts as a change of condition (kPa). */
  pressureChangeKpa?: number;
  /** How far back values count for the learned resolution (s). */
  resolutionWindowS?: number;
  /** Accepted for stored profiles of earlier versions; starts and stops are now part of the rule. */
  onlyWhenRunning?: boolean;
  label?: string;
  unit?: string;
}

export type StuckInput = RuleInput | (RuleReading & { aux?: 'speed' | 'pressure' });

export interface StuckRuleState {
  /** Start of the flat run (ms), null when no run. */
  runStart: number | null;
  /** Sliding maximum and minimum of the run: values strictly falling (rising) from front to back, times rising. */
  maxQ: PointDeque;
  minQ: PointDeque;
  active: boolean;
  /** Per candidate step (as a string key): last time a value was not a multiple of it. */
  offGridAt: Record<string, number>;
  /** Values seen (the learned resolution needs a few). */
  seen: number;
  lastRunning: boolean | null;
  refSpeed: number | null;
  refPressure: number | null;
  /** Last change of condition: when, and what. */
  changeTs: number | null;
  changeWhat: string | null;
  /** First change of condition inside the present flat run. */
  firstChangeTs: number | null;
  firstChangeWhat: string | null;
}

/** Candidate resolutions, coarsest first (channel units). */
export const RESOLUTION_STEPS = [1, 0.5, 0.2, 0.1, 0.05, 0.02, 0.01] as const;
/** The steps as `offGridAt` keys, made once. */
const RESOLUTION_KEYS = RESOLUTION_STEPS.map(String);
const MIN_VALUES_FOR_RESOLUTION = 10;

export function initialStuckState(): StuckRuleState {
  return {
    runStart: null,
    maxQ: createPointDeque(),
    minQ: createPointDeque(),
    active: false,
    offGridAt: {},
    seen: 0,
    lastRunning: null,
    refSpeed: null,
    refPressure: null,
    changeTs: null,
    changeWhat: null,
    firstChangeTs: null,
    firstChangeWhat: null,
  };
}

const onGrid = (v: number, step: number) => Math.abs(v / step - Math.round(v / step)) < 1e-6;

/** The resolution in force: the parameter, else the coarsest step every value of the window lies on (0 when unknown). */
export function stuckResolution(state: StuckRuleState, params: StuckRuleParams, now: number): number {
  if (typeof params.resolution === 'number' && params.resolution > 0) return params.resolution;
  if (state.seen < MIN_VALUES_FOR_RESOLUTION) return 0;
  const windowMs = (params.resolutionWindowS ?? 86_400) * 1000;
  for (let i = 0; i < RESOLUTION_STEPS.length; i++) {
    const off = state.offGridAt[RESOLUTION_KEYS[i]];
    if (off === undefined || now - off > windowMs) return RESOLUTION_STEPS[i];
  }
  return 0;
}

/** Words for a speed change: a start or a stop when it crosses a crawl speed, otherwise a load change. */
function speedChange(from: number, to: number): string {
  const turning = (rpm: number) => rpm >= 100;
  if (!turning(from) && turning(to)) return 'the engine started';
  if (turning(from) && !turning(to)) return 'the engine stopped';
  return `engine speed changed from ${fmt(from, 0)} to ${fmt(to, 0)} rpm`;
}

function noteChange(s: StuckRuleState, ts: number, what: string): void {
  s.changeTs = ts;
  s.changeWhat = what;
  if (s.firstChangeTs === null && s.runStart !== null) {
    s.firstChangeTs = ts;
    s.firstChangeWhat = what;
  }
}

export function stepStuck(state: StuckRuleState, input: StuckInput, params: StuckRuleParams): StepResult<StuckRuleState> {
  const events: RuleEvent[] = [];
  if (!isReading(input) || !isGood(input)) return { state, events };
  const s = state;
  const aux = (input as { aux?: 'speed' | 'pressure' }).aux;
  if (aux) {
    const limit = aux === 'speed' ? (params.speedChangeRpm ?? 150) : (params.pressureChangeKpa ?? 15);
    const ref = aux === 'speed' ? s.refSpeed : s.refPressure;
    if (ref !== null && Math.abs(input.value - ref) >= limit) {
      noteChange(s, input.ts, aux === 'speed' ? speedChange(ref, input.value) : `coolant pressure changed from ${fmt(ref, 0)} to ${fmt(input.value, 0)} kPa`);
    }
    if (ref === null || Math.abs(input.value - ref) >= limit) {
      if (aux === 'speed') s.refSpeed = input.value;
      else s.refPressure = input.value;
    }
    return { state: s, events };
  }

  const { maxQ, minQ } = s;
  const ts = input.ts;
  const value = input.value;
  if (maxQ.length && ts <= tsAt(maxQ, maxQ.length - 1)) return { state, events }; // out of order or duplicate time
  s.seen++;
  for (let i = 0; i < RESOLUTION_STEPS.length; i++) if (!onGrid(value, RESOLUTION_STEPS[i])) s.offGridAt[RESOLUTION_KEYS[i]] = ts;
  if (input.running !== undefined) {
    if (s.lastRunning !== null && input.running !== s.lastRunning) noteChange(s, ts, input.running ? 'the engine started' : 'the engine stopped');
    s.lastRunning = input.running;
  }
  const band = Math.max(params.epsilon, stuckResolution(s, params, ts));

  while (maxQ.length && valueAt(maxQ, maxQ.length - 1) <= value) popBack(maxQ);
  pushBack(maxQ, ts, value);
  while (minQ.length && valueAt(minQ, minQ.length - 1) >= value) popBack(minQ);
  pushBack(minQ, ts, value);
  const wasRun = s.runStart;
  let runStart = wasRun ?? ts;
  let moved = false;
  while (valueAt(maxQ, 0) - valueAt(minQ, 0) > band) {
    // Drop the older extreme: the run now starts at it (the last reading outside the new band).
    runStart = popFront(tsAt(maxQ, 0) <= tsAt(minQ, 0) ? maxQ : minQ)!;
    moved = true;
    while (maxQ.length && tsAt(maxQ, 0) <= runStart) popFront(maxQ);
    while (minQ.length && tsAt(minQ, 0) <= runStart) popFront(minQ);
  }
  if (wasRun === null || moved) {
    // a new flat run: only a change of condition inside it counts
    const inside = s.changeTs !== null && s.changeTs > runStart;
    s.firstChangeTs = inside ? s.changeTs : null;
    s.firstChangeWhat = inside ? s.changeWhat : null;
  }
  s.runStart = runStart;
  if (s.active && moved) {
    events.push({ kind: 'clear', ts, value, message: `${params.label ?? 'Value'} moving again (${fmt(value, 2)}${unitText(params)})` });
    s.active = false;
  }
  if (!s.active && s.firstChangeTs !== null && ts - s.firstChangeTs >= params.durationS * 1000) {
    s.active = true;
    const unit = unitText(params);
    events.push({
      kind: 'raise',
      ts,
      value,
      message: `${params.label ?? 'Value'} stuck at ${fmt(value, 2)}${unit} for ${fmt((ts - runStart) / 1000, 0)} s although ${s.firstChangeWhat} ${fmt((ts - s.firstChangeTs) / 1000, 0)} s ago (band ${fmt(band, 2)}${unit}; sensor or wiring?)`,
    });
  }
  return { state: s, events };
}

const unitText = (params: StuckRuleParams) => (params.unit ? ` ${params.unit}` : '');

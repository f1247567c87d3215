/**
 * Common shapes of the streaming rule evaluators. Every evaluator is a pure
 * `step(state, input, params) -> { state, events }`; state is plain JSON so the
 * server can persist it and the browser can replay it.
 */

/** One reading of the channel a rule watches. `quality` 0 = good, 1 = bad (as stored). */
export interface RuleReading {
  ts: number;
  value: number;
  quality: number;
  /** Engine running at that moment (from engine_speed). Optional for rules that do not gate on it. */
  running?: boolean;
}

/** A clock tick: only the time, so silence and delays can complete without new data. */
export interface RuleTick {
  ts: number;
}

export type RuleInput = RuleReading | RuleTick;

export type RuleEventKind = 'raise' | 'clear';

export interface RuleEvent {
  kind: RuleEventKind;
  /** When the condition was met (exact, ms since epoch), which may be before the input that revealed it. */
  ts: number;
  value: number | null;
  message: string;
}

export interface StepResult<S> {
  state: S;
  events: RuleEvent[];
}

/** Which engine state a rule applies to. */
export interface RunGate {
  onlyWhenRunning?: boolean;
  onlyWhenStopped?: boolean;
}

export function isReading(input: RuleInput): input is RuleReading {
  return typeof (input as RuleReading).value === 'number';
}

export function isGood(r: RuleReading): boolean {
  return r.quality === 0 && Number.isFinite(r.value);
}

/** True when the gate lets the rule evaluate this reading. Unknown running state counts as not matching a gate. */
export function gateOpen(gate: RunGate, running: boolean | undefined): boolean {
  if (gate.onlyWhenRunning) return running === true;
  if (gate.onlyWhenStopped) return running === false;
  return true;
}

export function gateText(gate: RunGate): string {
  if (gate.onlyWhenRunning) return 'engine not running';
  if (gate.onlyWhenStopped) return 'engine running';
  return '';
}

/** Median of a non-empty list (copy sorted). */
export function median(values: readonly number[]): number {
  if (values.length === 0) return NaN;
  const s = [...values].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}

export function fmt(n: number | null, digits = 1): string {
  return n === null || !Number.isFinite(n) ? '—' : n.toFixed(digits);
}

import { RuleEvent, StepResult } from '../../../shared/rules/rule-types';

/** Feed a rule a sequence and collect every event (the state is threaded through like the server does). */
export function runRule<S, I, P>(step: (s: S, i: I, p: P) => StepResult<S>, init: S, inputs: I[], params: P): { state: S; events: RuleEvent[] } {
  let state = init;
  const events: RuleEvent[] = [];
  for (const i of inputs) {
    const r = step(state, i, params);
    // Round-trip through JSON: state must be serialisable for persistence.
    state = JSON.parse(JSON.stringify(r.state));
    events.push(...r.events);
  }
  return { state, events };
}

export const S = 1000;
export const MIN = 60 * S;
/** Readings every `everyS` seconds from t0 with the given values. */
export function series(values: number[], everyS: number, t0 = 0, running = true) {
  return values.map((value, i) => ({ ts: t0 + i * everyS * S, value, quality: 0, running }));
}

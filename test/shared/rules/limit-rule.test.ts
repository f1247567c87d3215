import { initialLimitState, stepLimit, LimitRuleParams, limitStatus } from '../../../shared/rules/limit-rule';
import { runRule, series, S } from './run-rule';

// Semantics checked against OPC UA Part 9 (IEC 62541-9) Annex B and ISA-18.2 definitions of
// deadband (the value must return past limit - deadband), on-delay (the condition must persist
// for the delay before the alarm activates) and off-delay (the return must persist before clearing).

const high: LimitRuleParams = { direction: 'high', limit: 100, deadband: 2, label: 'Coolant temperature', unit: '°C' };

describe('limit rule: deadband', () => {
  it('classifies alarm / between / normal around a high limit', () => {
    expect(limitStatus(100.01, high)).toBe('alarm');
    expect(limitStatus(100, high)).toBe('between');
    expect(limitStatus(98.5, high)).toBe('between');
    expect(limitStatus(98, high)).toBe('normal');
  });

  it('a value hovering at the limit raises once and does not chatter', () => {
    const values = [99, 100.2, 99.8, 100.3, 99.5, 100.1, 99.9, 100.4, 99.1, 100.2];
    const { events, state } = runRule(stepLimit, initialLimitState(), series(values, 1), high);
    expect(events.map((e) => e.kind)).toEqual(['raise']);
    expect(events[0].ts).toBe(1 * S);
    expect(state.active).toBe(true);
    expect(state.worstValue).toBe(100.4);
    expect(state.raisedValue).toBe(100.2);
  });

  it('without a deadband the same sequence chatters (why the deadband exists)', () => {
    const values = [99, 100.2, 99.8, 100.3, 99.5, 100.1];
    const { events } = runRule(stepLimit, initialLimitState(), series(values, 1), { ...high, deadband: 0 });
    expect(events.map((e) => e.kind)).toEqual(['raise', 'clear', 'raise', 'clear', 'raise']);
  });

  it('clears once the value is back at limit - deadband', () => {
    const { events } = runRule(stepLimit, initialLimitState(), series([101, 99, 98.5, 98, 97], 1), high);
    expect(events.map((e) => [e.kind, e.ts])).toEqual([
      ['raise', 0],
      ['clear', 3 * S],
    ]);
  });

  it('low limit mirrors the high one', () => {
    const low: LimitRuleParams = { direction: 'low', limit: 30, deadband: 3 };
    const { events } = runRule(stepLimit, initialLimitState(), series([35, 29, 31, 32.9, 33, 28], 10), low);
    expect(events.map((e) => [e.kind, e.ts, e.value])).toEqual([
      ['raise', 10 * S, 29],
      ['clear', 40 * S, 33],
      ['raise', 50 * S, 28],
    ]);
  });
});

describe('limit rule: on-delay and off-delay timings', () => {
  const p: LimitRuleParams = { ...high, onDelayS: 30, offDelayS: 20 };

  it('raises exactly on-delay after the condition began, by tick', () => {
    const inputs = [{ ts: 0, value: 95, quality: 0 }, { ts: 10 * S, value: 101, quality: 0 }, { ts: 39 * S }, { ts: 40 * S }, { ts: 41 * S }];
    const { events } = runRule(stepLimit, initialLimitState(), inputs, p);
    expect(events).toHaveLength(1);
    expect(events[0]).toMatchObject({ kind: 'raise', ts: 40 * S, value: 101 });
  });

  it('the exact raise time does not depend on when the next input comes', () => {
    const inputs = [
      { ts: 10 * S, value: 101, quality: 0 },
      { ts: 55 * S, value: 102, quality: 0 },
    ];
    const { events } = runRule(stepLimit, initialLimitState(), inputs, p);
    expect(events.map((e) => [e.kind, e.ts])).toEqual([['raise', 40 * S]]);
  });

  it('a condition shorter than the on-delay raises nothing', () => {
    const { events } = runRule(stepLimit, initialLimitState(), series([101, 101, 101, 99, 101, 101, 101, 97], 10), p);
    expect(events).toEqual([]);
  });

  it('the off-delay restarts if the value goes back into the deadband', () => {
    // raise at 30 s (condition from 0 s); normal at 40 s; back into the band at 50 s; normal again 60 s; clear at 80 s.
    const inputs = [...series([101, 101, 101, 101, 97, 99, 97], 10), { ts: 79 * S }, { ts: 80 * S }];
    const { events } = runRule(stepLimit, initialLimitState(), inputs, p);
    expect(events.map((e) => [e.kind, e.ts])).toEqual([
      ['raise', 30 * S],
      ['clear', 80 * S],
    ]);
  });

  it('bad-quality readings are ignored (neither start nor break a delay)', () => {
    const inputs = [
      { ts: 0, value: 101, quality: 0 },
      { ts: 10 * S, value: 20, quality: 1 },
      { ts: 20 * S, value: 500, quality: 1 },
      { ts: 30 * S, value: 101, quality: 0 },
    ];
    const { events } = runRule(stepLimit, initialLimitState(), inputs, p);
    expect(events.map((e) => [e.kind, e.ts])).toEqual([['raise', 30 * S]]);
    const onlyBad = runRule(stepLimit, initialLimitState(), [{ ts: 0, value: 500, quality: 1 }, { ts: 100 * S }], p);
    expect(onlyBad.events).toEqual([]);
  });
});

describe('limit rule: engine state gates', () => {
  it('onlyWhenRunning: ignored while stopped; clears at once when the engine stops', () => {
    const p: LimitRuleParams = { ...high, onlyWhenRunning: true };
    const stopped = runRule(stepLimit, initialLimitState(), series([105, 106], 10, 0, false), p);
    expect(stopped.events).toEqual([]);
    const inputs = [...series([105], 10, 0, true), ...series([104], 10, 10 * S, false)];
    const { events } = runRule(stepLimit, initialLimitState(), inputs, p);
    expect(events.map((e) => [e.kind, e.ts])).toEqual([
      ['raise', 0],
      ['clear', 10 * S],
    ]);
    expect(events[1].message).toMatch(/engine not running/);
  });

  it('onlyWhenStopped: a low jacket temperature on a stopped standby engine (heater failed)', () => {
    const p: LimitRuleParams = { direction: 'low', limit: 20, deadband: 2, onlyWhenStopped: true };
    const { events } = runRule(stepLimit, initialLimitState(), [...series([18], 10, 0, false), ...series([18], 10, 10 * S, true)], p);
    expect(events.map((e) => e.kind)).toEqual(['raise', 'clear']);
    expect(runRule(stepLimit, initialLimitState(), series([18, 17], 10, 0, true), p).events).toEqual([]);
  });
});

import { initialNoDataState, stepNoData, silenceLimitMs, NoDataRuleParams } from '../../../shared/rules/no-data-rule';
import { initialStuckState, stepStuck, StuckRuleParams } from '../../../shared/rules/stuck-rule';
import { runRule, series, S, MIN } from './run-rule';

describe('no-data rule', () => {
  const p: NoDataRuleParams = { factor: 5, minSilenceS: 30, label: 'Coolant temperature' };

  it('learns the usual interval as a median and raises after factor x interval of silence, exactly', () => {
    const readings = series(Array.from({ length: 11 }, () => 80), 10); // 0..100 s every 10 s
    const { state, events } = runRule(stepNoData, initialNoDataState(), [...readings, { ts: 150 * S }, { ts: 151 * S }], p);
    expect(silenceLimitMs(state, p)).toBe(50 * S);
    expect(events).toHaveLength(1);
    expect(events[0]).toMatchObject({ kind: 'raise', ts: 150 * S });
  });

  it('clears on the next reading, and the outage is not learned as an interval', () => {
    const readings = series(Array.from({ length: 11 }, () => 80), 10);
    const { state, events } = runRule(stepNoData, initialNoDataState(), [...readings, { ts: 400 * S }, { ts: 700 * S, value: 80, quality: 0 }], p);
    expect(events.map((e) => [e.kind, e.ts])).toEqual([['raise', 150 * S], ['clear', 700 * S]]);
    expect(state.intervalsMs.every((i) => i === 10 * S)).toBe(true);
    expect(state.active).toBe(false);
  });

  it('the median is robust to a burst of fast readings; the minimum holds for fast channels', () => {
    const ts = [0, 10, 20, 30, 40, 50, 60, 70, 80, 90, 100, 101, 102, 103, 110, 120].map((t) => ({ ts: t * S, value: 1, quality: 0 }));
    const { state, events } = runRule(stepNoData, initialNoDataState(), ts, { factor: 5, minSilenceS: 5, initialIntervalS: 10 });
    // intervals: ten of 10 s, then 1, 1, 1, 7, 10 -> median 10 s (a mean would say 8.3 s)
    expect(silenceLimitMs(state, { factor: 5, minSilenceS: 5 })).toBe(50 * S);
    expect(events).toEqual([]);
    const fast = runRule(stepNoData, initialNoDataState(), series([1, 1, 1, 1], 1), p).state;
    expect(silenceLimitMs(fast, p)).toBe(30 * S);
  });

  it('before any interval is learned, the initial interval or the minimum applies', () => {
    expect(silenceLimitMs(initialNoDataState(), p)).toBe(30 * S);
    expect(silenceLimitMs(initialNoDataState(), { ...p, initialIntervalS: 60 })).toBe(300 * S);
  });

  it('a bad-quality reading still counts as the device talking', () => {
    const { events } = runRule(stepNoData, initialNoDataState(), [{ ts: 0, value: 1, quality: 0 }, { ts: 20 * S, value: 9999, quality: 1 }, { ts: 45 * S }], p);
    expect(events).toEqual([]);
  });

  it('with a start time, silence before the first reading counts', () => {
    const { events } = runRule(stepNoData, initialNoDataState(0), [{ ts: 31 * S }], p);
    expect(events.map((e) => [e.kind, e.ts])).toEqual([['raise', 30 * S]]);
    expect(runRule(stepNoData, initialNoDataState(), [{ ts: 10 * MIN }], p).events).toEqual([]);
  });
});

describe('stuck rule', () => {
  const p: StuckRuleParams = { epsilon: 0.05, durationS: 300, label: 'Coolant temperature', unit: '°C' };

  it('a value flat within epsilon while running raises after the duration, clears when it moves', () => {
    const flat = Array.from({ length: 40 }, (_, i) => 82.0 + (i % 2) * 0.03); // 0..390 s
    const moving = [82.5, 83.0];
    const { events, state } = runRule(stepStuck, initialStuckState(), series([...flat, ...moving], 10), p);
    expect(events.map((e) => [e.kind, e.ts])).toEqual([['raise', 300 * S], ['clear', 400 * S]]);
    expect(state.active).toBe(false);
  });

  it('a slow genuine drift is not stuck', () => {
    const drift = Array.from({ length: 60 }, (_, i) => 80 + i * 0.02);
    expect(runRule(stepStuck, initialStuckState(), series(drift, 10), p).events).toEqual([]);
  });

  it('the flat run is timed from the last reading outside the band', () => {
    // moves until 100 s, then flat: raise when 300 s have passed since the 100 s reading's band was left.
    const values = [70, 72, 74, 76, 78, 80, ...Array.from({ length: 40 }, () => 81)];
    const { events } = runRule(stepStuck, initialStuckState(), series(values, 10), p);
    // last reading outside the band of 81: 80 at 50 s -> raise at 350 s
    expect(events.map((e) => [e.kind, e.ts])).toEqual([['raise', 350 * S]]);
  });

  it('not evaluated while stopped (a stopped engine can sit at one temperature)', () => {
    const flat = Array.from({ length: 60 }, () => 25);
    expect(runRule(stepStuck, initialStuckState(), series(flat, 10, 0, false), p).events).toEqual([]);
    const inputs = [...series(flat.slice(0, 35), 10, 0, true), ...series([25], 10, 350 * S, false)];
    const { events } = runRule(stepStuck, initialStuckState(), inputs, p);
    expect(events.map((e) => e.kind)).toEqual(['raise', 'clear']);
  });

  it('keeps a small state on a long flat run', () => {
    const flat = Array.from({ length: 5000 }, () => 82);
    const { state } = runRule(stepStuck, initialStuckState(), series(flat, 1), { ...p, durationS: 100000 });
    expect(state.maxQ.length + state.minQ.length).toBeLessThanOrEqual(2);
  });
});

import { initialNoDataState, stepNoData, silenceLimitMs, NoDataRuleParams } from '../../../shared/rules/no-data-rule';
import { initialStuckState, stepStuck, stuckResolution, StuckRuleParams } from '../../../shared/rules/stuck-rule';
import { runRule, series, S, MIN } from './run-rule';

describe('no-data rule', () => {
  const p: NoDataRuleParams = { factor: 5, minSilenceS: 30, label: 'Coolant temperature' };

  it('learns the usual interval as a median and raises after factor x interval of silence, exactly', () => {
    const readings = series(
      Array.from({ length: 11 }, () => 80),
      10,
    ); // 0..100 s every 10 s
    const { state, events } = runRule(stepNoData, initialNoDataState(), [...readings, { ts: 150 * S }, { ts: 151 * S }], p);
    expect(silenceLimitMs(state, p)).toBe(50 * S);
    expect(events).toHaveLength(1);
    expect(events[0]).toMatchObject({ kind: 'raise', ts: 150 * S });
  });

  it('clears on the next reading, and the outage is not learned as an interval', () => {
    const readings = series(
      Array.from({ length: 11 }, () => 80),
      10,
    );
    const { state, events } = runRule(stepNoData, initialNoDataState(), [...readings, { ts: 400 * S }, { ts: 700 * S, value: 80, quality: 0 }], p);
    expect(events.map((e) => [e.kind, e.ts])).toEqual([
      ['raise', 150 * S],
      ['clear', 700 * S],
    ]);
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

  it('the first interval of history sent at 300 s steps is learned, not taken for a silence', () => {
    const { state, events } = runRule(stepNoData, initialNoDataState(), series([80, 80, 80, 80], 300), p);
    expect(events).toEqual([]);
    expect(silenceLimitMs(state, p)).toBe(1500 * S);
  });

  it('with a start time, silence before the first reading counts', () => {
    const { events } = runRule(stepNoData, initialNoDataState(0), [{ ts: 31 * S }], p);
    expect(events.map((e) => [e.kind, e.ts])).toEqual([['raise', 30 * S]]);
    expect(runRule(stepNoData, initialNoDataState(), [{ ts: 10 * MIN }], p).events).toEqual([]);
  });
});

describe('stuck rule', () => {
  const p: StuckRuleParams = { epsilon: 0.05, durationS: 300, label: 'Coolant temperature', unit: '°C' };
  /** One sample every 10 s: the watched value with the running flag, plus speed and pressure as context. */
  function samples(rows: { value: number; running: boolean; rpm?: number; kPa?: number }[], t0 = 0) {
    return rows.flatMap((r, i) => {
      const ts = t0 + i * 10 * S;
      return [
        { ts, value: r.rpm ?? (r.running ? 1800 : 0), quality: 0, aux: 'speed' as const },
        { ts, value: r.kPa ?? 60, quality: 0, aux: 'pressure' as const },
        { ts, value: r.value, quality: 0, running: r.running },
      ];
    });
  }
  const rows = (n: number, f: (i: number) => number, running: boolean, extra: { rpm?: number; kPa?: number } = {}) =>
    Array.from({ length: n }, (_, i) => ({ value: f(i), running, ...extra }));

  it('a whole-degree sensor at steady load repeats one value for an hour: no alarm', () => {
    // 85 °C, now and then 86 (whole degrees), 360 samples = 1 h at steady speed and pressure
    const steady = rows(360, (i) => (i % 47 === 0 ? 86 : 85), true);
    const { events, state } = runRule(stepStuck, initialStuckState(), samples(steady), p);
    expect(events).toEqual([]);
    expect(stuckResolution(state, p, 3600 * S)).toBe(1);
  });

  it('stuck while the engine starts: raises the duration after the start, clears when the value moves', () => {
    // stopped at 40 °C (heater) for 5 min, then the engine starts and the reading stays at exactly 40
    const seq = [...rows(30, () => 40, false), ...rows(40, () => 40, true), ...rows(3, (i) => 45 + i, true)];
    const { events } = runRule(stepStuck, initialStuckState(), samples(seq), p);
    expect(events.map((e) => [e.kind, e.ts])).toEqual([
      ['raise', (300 + 300) * S],
      ['clear', 700 * S],
    ]);
    expect(events[0].message).toMatch(/the engine started/);
  });

  it('a whole-degree sensor that stays at one degree through a start is stuck too', () => {
    const seq = [...rows(30, () => 40, false), ...rows(40, () => 40, true)];
    const { events } = runRule(stepStuck, initialStuckState(), samples(seq), p);
    expect(events.map((e) => e.kind)).toEqual(['raise']);
  });

  it('a healthy sensor through a start: the value rises, no alarm', () => {
    const seq = [...rows(30, () => 40, false), ...rows(60, (i) => Math.min(85, 40 + i), true)];
    expect(runRule(stepStuck, initialStuckState(), samples(seq), p).events).toEqual([]);
  });

  it('a load change seen in pressure while the value stays flat raises; a stop does too', () => {
    const load = [...rows(30, () => 85, true), ...rows(40, () => 85, true, { kPa: 85 })];
    const { events } = runRule(stepStuck, initialStuckState(), samples(load), p);
    expect(events.map((e) => [e.kind, e.ts])).toEqual([['raise', 600 * S]]);
    expect(events[0].message).toMatch(/pressure changed/);
    const stop = [...rows(30, () => 85, true), ...rows(40, () => 85, false)];
    expect(runRule(stepStuck, initialStuckState(), samples(stop), p).events.map((e) => e.kind)).toEqual(['raise']);
  });

  it('the resolution setting widens the band: jitter within one step of a coarse sensor counts as flat', () => {
    const seq = [...rows(30, () => 40, false), ...rows(40, (i) => 40 + (i % 3) * 0.2, true)];
    expect(runRule(stepStuck, initialStuckState(), samples(seq), p).events).toEqual([]);
    expect(runRule(stepStuck, initialStuckState(), samples(seq), { ...p, resolution: 1 }).events.map((e) => e.kind)).toEqual(['raise']);
  });

  it('learns the coarsest step every recent value lies on', () => {
    const tenths = runRule(
      stepStuck,
      initialStuckState(),
      series(
        Array.from({ length: 20 }, (_, i) => 80 + i / 10),
        10,
      ),
      p,
    ).state;
    expect(stuckResolution(tenths, p, 200 * S)).toBe(0.1);
    const fine = runRule(
      stepStuck,
      initialStuckState(),
      series(
        Array.from({ length: 20 }, (_, i) => 80 + i * 0.013),
        10,
      ),
      p,
    ).state;
    expect(stuckResolution(fine, p, 200 * S)).toBe(0);
    expect(stuckResolution(fine, { ...p, resolution: 0.5 }, 200 * S)).toBe(0.5);
  });

  it('keeps a small state on a long flat run', () => {
    const flat = Array.from({ length: 5000 }, () => 82);
    const { state } = runRule(stepStuck, initialStuckState(), series(flat, 1), { ...p, durationS: 100000 });
    expect(state.maxQ.length + state.minQ.length).toBeLessThanOrEqual(2);
  });
});

import { initialRateState, stepRate, leastSquaresSlope, RateRuleParams } from '../../../shared/rules/rate-rule';
import { runRule, series, S, MIN } from './run-rule';

describe('least-squares slope', () => {
  it("matches Anscombe's quartet, data set I (fitted line y = 3.00 + 0.500 x)", () => {
    // Source: F. J. Anscombe, "Graphs in Statistical Analysis", The American Statistician 27(1), 1973, pp. 17-21.
    const x = [10, 8, 13, 9, 11, 14, 6, 4, 12, 7, 5];
    const y = [8.04, 6.95, 7.58, 8.81, 8.33, 9.96, 7.24, 4.26, 10.84, 4.82, 5.68];
    const slope = leastSquaresSlope(x.map((ts, i) => ({ ts, value: y[i] })));
    expect(slope).toBeCloseTo(0.5001, 4);
  });
  it('needs two distinct times', () => {
    expect(leastSquaresSlope([{ ts: 1, value: 2 }])).toBeNull();
    expect(
      leastSquaresSlope([
        { ts: 1, value: 2 },
        { ts: 1, value: 3 },
      ]),
    ).toBeNull();
  });
});

describe('rate rule', () => {
  const rising: RateRuleParams = {
    direction: 'rising',
    ratePerMin: 1.5,
    windowS: 60,
    onDelayS: 30,
    onlyWhenRunning: true,
    label: 'Coolant temperature',
    unit: '°C',
  };

  it('temperature rising at 2 °C/min while running raises after the on-delay', () => {
    // flat 80 °C for 2 min, then +2 °C/min (1/3 °C each 10 s)
    const flat = Array.from({ length: 12 }, () => 80);
    const ramp = Array.from({ length: 12 }, (_, i) => 80 + ((i + 1) * 2) / 6);
    const { events, state } = runRule(stepRate, initialRateState(), series([...flat, ...ramp], 10), rising);
    expect(events).toHaveLength(1);
    expect(events[0].kind).toBe('raise');
    // The 60 s window slope first exceeds 1.5 °C/min at 160 s (window 100..160 s: 1 flat + 6 ramp points);
    // the on-delay of 30 s then makes it 190 s.
    expect(events[0].ts).toBe(190 * S);
    expect(state.slopePerMin).toBeCloseTo(2, 9);
  });

  it('a slow rise (1 °C/min) does not raise, a stopped engine is not evaluated', () => {
    const slow = Array.from({ length: 30 }, (_, i) => 70 + i / 6);
    expect(runRule(stepRate, initialRateState(), series(slow, 10), rising).events).toEqual([]);
    const fast = Array.from({ length: 30 }, (_, i) => 70 + i);
    expect(runRule(stepRate, initialRateState(), series(fast, 10, 0, false), rising).events).toEqual([]);
  });

  it('pressure falling while stopped (a leak) raises, and clears when it steadies', () => {
    const leak: RateRuleParams = {
      direction: 'falling',
      ratePerMin: 2,
      windowS: 120,
      onDelayS: 60,
      offDelayS: 60,
      onlyWhenStopped: true,
      label: 'Coolant pressure',
      unit: 'kPa',
    };
    const falling = Array.from({ length: 40 }, (_, i) => 90 - (i * 3) / 6); // -3 kPa/min, every 10 s
    const steady = Array.from({ length: 30 }, () => 70.5);
    const { events } = runRule(stepRate, initialRateState(), series([...falling, ...steady], 10, 0, false), leak);
    expect(events.map((e) => e.kind)).toEqual(['raise', 'clear']);
    // Full window (span >= 60 s, 7 points) reached at 60 s with slope -3: on-delay 60 s -> 120 s.
    expect(events[0].ts).toBe(2 * MIN);
    expect(events[0].value).toBeCloseTo(-3, 9);
    expect(events[1].ts).toBeGreaterThan(400 * S);
  });

  it('noise on a flat signal does not raise (window smooths it)', () => {
    let seed = 7;
    const rnd = () => (seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648 - 0.5;
    const noisy = Array.from({ length: 60 }, () => 80 + rnd() * 0.6);
    expect(runRule(stepRate, initialRateState(), series(noisy, 10), rising).events).toEqual([]);
  });
});

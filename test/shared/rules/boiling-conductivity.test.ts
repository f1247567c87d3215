import { boilingPointC } from '../../../shared/coolant/boiling-point';
import { initialBoilingMarginState, stepBoilingMargin, BoilingMarginParams, BoilingMarginInput } from '../../../shared/rules/boiling-margin-rule';
import { initialConductivityState, stepConductivity, ConductivityRuleParams } from '../../../shared/rules/conductivity-rule';
import { runRule, S } from './run-rule';

const ATM = 101.325; // kPa, NIST SP 811

describe('boiling point numbers used by the boiling-margin rule', () => {
  // IAPWS-IF97 (Revised Release, 2007), region 4 check values: Tsat(0.1 MPa) = 372.755919 K, Tsat(1 MPa) = 453.035632 K.
  it('plain water at 0.1 MPa absolute: Tsat = 372.755919 K (IAPWS-IF97 check value)', () => {
    expect(boilingPointC(100 - ATM, 'ethylene', 0, 'volume') + 273.15).toBeCloseTo(372.755919, 5);
  });
  it('plain water at 1 MPa absolute: Tsat = 453.035632 K (IAPWS-IF97 check value)', () => {
    expect(boilingPointC(1000 - ATM, 'ethylene', 0, 'volume') + 273.15).toBeCloseTo(453.035632, 5);
  });
  it('cap pressure raises the boiling point by roughly 1.5 °C per psi near atmospheric (common practice rule of thumb)', () => {
    const per7kPa = boilingPointC(103.4, 'ethylene', 0, 'volume') - boilingPointC(0, 'ethylene', 0, 'volume'); // 15 psi cap
    expect(per7kPa / 15).toBeGreaterThan(1.0);
    expect(per7kPa / 15).toBeLessThan(1.8);
  });
});

describe('boiling-margin rule', () => {
  const params: BoilingMarginParams = { marginC: 10, deadbandC: 2, onDelayS: 0, glycol: 'ethylene', glycolPercent: 0, basis: 'volume' };
  const temp = (ts: number, value: number): BoilingMarginInput => ({ ts, value, quality: 0, running: true, channel: 'coolant_temp' });
  const pres = (ts: number, value: number): BoilingMarginInput => ({ ts, value, quality: 0, running: true, channel: 'coolant_pressure' });

  it('the same coolant temperature is safe under cap pressure and not at atmospheric pressure', () => {
    // 105 °C: at 100 kPa gauge (201.325 kPa abs) Tsat ≈ 120.6 °C (IAPWS-IF97) -> margin ≈ 15.6 °C: no alarm.
    const pressurised = runRule(stepBoilingMargin, initialBoilingMarginState(), [pres(0, 100), temp(1 * S, 105)], params);
    expect(pressurised.events).toEqual([]);
    expect(pressurised.state.lastBoilingPointC).toBeCloseTo(boilingPointC(100, 'ethylene', 0, 'volume'), 9);
    expect(pressurised.state.lastMarginC!).toBeGreaterThan(15);
    expect(pressurised.state.lastMarginC!).toBeLessThan(16);
    // Pressure lost (cap or hose): 0 kPa gauge -> Tsat ≈ 99.97 °C, margin about -5 °C: alarm.
    const lost = runRule(stepBoilingMargin, initialBoilingMarginState(), [pres(0, 100), temp(1 * S, 105), pres(2 * S, 0), temp(3 * S, 105)], params);
    expect(lost.events.map((e) => [e.kind, e.ts])).toEqual([['raise', 3 * S]]);
    expect(lost.events[0].value!).toBeCloseTo(99.974 - 105, 2);
  });

  it('glycol raises the boiling point (a 50 % mix keeps more margin than water)', () => {
    const water = runRule(stepBoilingMargin, initialBoilingMarginState(), [pres(0, 50), temp(1 * S, 100)], params).state.lastMarginC!;
    const mix = runRule(stepBoilingMargin, initialBoilingMarginState(), [pres(0, 50), temp(1 * S, 100)], { ...params, glycolPercent: 50 }).state.lastMarginC!;
    expect(mix).toBeGreaterThan(water + 2);
  });

  it('no pressure reading, water only: silent at 90 °C and 95 °C (inside the normal band); stale pressure is not used', () => {
    // 0 kPa would give a margin of about 10 °C at 90 °C: an alarm inside the normal running band. No verdict instead.
    expect(runRule(stepBoilingMargin, initialBoilingMarginState(), [temp(0, 90), temp(1 * S, 95)], params).events).toEqual([]);
    const stopped = (ts: number, value: number): BoilingMarginInput => ({ ts, value, quality: 0, running: false, channel: 'coolant_temp' });
    expect(runRule(stepBoilingMargin, initialBoilingMarginState(), [stopped(0, 95)], { ...params, capPressureKpa: 100 }).events).toEqual([]);
    const stale = runRule(stepBoilingMargin, initialBoilingMarginState(), [pres(0, 100), temp(120 * S, 95)], params);
    expect(stale.events).toEqual([]);
    expect(stale.state.lastMarginC).toBeNull();
  });

  it("no pressure reading, running and warm: the cap's rating is used and the alarm text says so", () => {
    const p = { ...params, capPressureKpa: 100 };
    // 90 °C with a 100 kPa cap: boiling point ≈ 120.6 °C (IAPWS-IF97), margin ≈ 30 °C, no alarm
    const warm = runRule(stepBoilingMargin, initialBoilingMarginState(), [temp(0, 90)], p);
    expect(warm.events).toEqual([]);
    expect(warm.state.assumedPressure).toBe(true);
    expect(warm.state.lastBoilingPointC).toBeCloseTo(boilingPointC(100, 'ethylene', 0, 'volume'), 9);
    const hot = runRule(stepBoilingMargin, initialBoilingMarginState(), [temp(0, 115)], p);
    expect(hot.events).toHaveLength(1);
    expect(hot.events[0].message).toMatch(/no pressure reading: the cap's rating of 100 kPa assumed/);
  });

  it('at 1,500 m (84.56 kPa, ICAO Doc 7488 standard atmosphere) a 50 % glycol mix under 100 kPa alarms about 3 °C earlier than at sea level', () => {
    const mix = { ...params, glycolPercent: 50 };
    const sea = runRule(stepBoilingMargin, initialBoilingMarginState(), [pres(0, 100), temp(1 * S, 118)], mix);
    const high = runRule(stepBoilingMargin, initialBoilingMarginState(), [pres(0, 100), temp(1 * S, 118)], { ...mix, atmosphereKpa: 84.56 });
    // boiling points ≈ 129.5 °C and ≈ 126.7 °C: margins 11.5 °C (no alarm) and 8.7 °C (alarm)
    expect(sea.events).toEqual([]);
    expect(high.events.map((e) => e.kind)).toEqual(['raise']);
    expect(sea.state.lastBoilingPointC! - high.state.lastBoilingPointC!).toBeCloseTo(2.88, 1);
  });

  it('deadband: clears only at margin >= set + deadband', () => {
    const p = { ...params, boilingPointC: () => 120 }; // boiling point fixed at 120 °C through an injected function
    const { events } = runRule(
      stepBoilingMargin,
      initialBoilingMarginState(),
      [pres(0, 50), temp(0, 111), temp(1 * S, 109), temp(2 * S, 108.5), temp(3 * S, 108)],
      p,
    );
    expect(events.map((e) => [e.kind, e.ts])).toEqual([
      ['raise', 0],
      ['clear', 3 * S],
    ]);
  });

  it('a pressure outside the property equations gives no verdict and does not crash', () => {
    const { events } = runRule(stepBoilingMargin, initialBoilingMarginState(), [pres(0, -101.3), temp(1 * S, 50)], params);
    expect(events).toEqual([]);
  });
});

describe('conductivity rule', () => {
  const change = 1_000_000;
  const r = (ts: number, value: number) => ({ ts, value, quality: 0 });
  const params: ConductivityRuleParams = { baselineFrom: change, baselineCount: 5, risePercent: 25, absoluteLimit: 5000, deadband: 100 };

  it('baseline = median of the first readings after the coolant change; old coolant readings ignored', () => {
    const inputs = [
      r(change - 10 * S, 4800),
      r(change, 2000),
      r(change + 1, 2100),
      r(change + 2, 1900),
      r(change + 3, 2050),
      r(change + 4, 1950),
      r(change + 5, 2400),
      r(change + 6, 2600),
    ];
    const { state, events } = runRule(stepConductivity, initialConductivityState(), inputs, params);
    expect(state.baseline).toBe(2000);
    expect(events.map((e) => [e.kind, e.value])).toEqual([['raise', 2600]]); // limit 2500 µS/cm
    expect(events[0].message).toMatch(/\+30 % on baseline 2000/);
    const back = runRule(stepConductivity, state, [r(change + 7, 2450), r(change + 8, 2400)], params);
    expect(back.events.map((e) => [e.kind, e.value])).toEqual([['clear', 2400]]);
  });

  it('absolute limit applies before the baseline is known', () => {
    const { events } = runRule(stepConductivity, initialConductivityState(), [r(change, 5200)], params);
    expect(events.map((e) => e.kind)).toEqual(['raise']);
  });

  it('a new coolant change starts a new baseline', () => {
    const first = runRule(
      stepConductivity,
      initialConductivityState(),
      [1000, 1000, 1000, 1000, 1000].map((v, i) => r(change + i, v)),
      params,
    ).state;
    expect(first.baseline).toBe(1000);
    const later = change + 100 * S;
    const second = runRule(
      stepConductivity,
      first,
      [3000, 3000, 3000, 3000, 3000].map((v, i) => r(later + i, v)),
      { ...params, baselineFrom: later },
    );
    expect(second.state.baseline).toBe(3000);
    expect(second.events).toEqual([]);
  });
});

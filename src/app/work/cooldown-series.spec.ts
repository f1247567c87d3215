import { coolingTemperature, timeToReachS } from '../../../shared/cooling/newton-cooling';
import { CURVE_POINTS, MAX_MEASURED_POINTS, ReadingBucket, buildCooldown } from './cooldown-series';

// Hand-made cool-down: Newton's law T(t) = Ta + (T0 - Ta) e^(-t/tau) (lumped capacitance, any heat-transfer
// textbook) with T0 88 °C, Ta 25 °C, tau 1800 s; the crossing time of the limit is checked against
// timeToReachS, t = tau ln((T0 - Ta)/(Tlim - Ta)), from the shared module.
const STOP = Date.UTC(2026, 11, 2, 1, 0, 0);
const metric = { temperature: 'degC', pressure: 'kPa', volume: 'L' } as const;

function buckets(n: number, everyS: number, f: (s: number) => number): ReadingBucket[] {
  return Array.from({ length: n }, (_, i) => {
    const v = f(i * everyS);
    return { t: STOP + i * everyS * 1000, mean: v, min: v, max: v, count: 1 };
  });
}

const temp = (n = 60) => buckets(n, 10, (s) => coolingTemperature(88, 25, 1800, s));
const pressure = (n = 60) => buckets(n, 10, (s) => (s < 100 ? 95 : 95 * Math.exp(-(s - 100) / 300)));
const input = (over: Partial<Parameters<typeof buildCooldown>[0]> = {}) => ({
  stopTs: STOP,
  temp: temp(),
  pressure: pressure(),
  safeOpenTempC: 50,
  maxPressureKpa: 7,
  heaterSetpointC: null,
  ambientC: 25,
  prefs: metric,
  ...over,
});

describe('buildCooldown', () => {
  it('stays bounded whatever the server sends', () => {
    // 5000 buckets 0.2 s apart: still above the limit at the end (1000 s < 1800 ln(63/25) s)
    const many = buckets(5000, 0.2, (s) => coolingTemperature(88, 25, 1800, s));
    const m = buildCooldown(input({ temp: many, pressure: pressure(5000), maxPoints: 320 }));
    expect(m.temp.measured.length).toBe(320);
    expect(m.pressure.measured.length).toBe(320);
    expect(m.temp.measured.at(-1)!.x).toBe(STOP + 4999 * 200); // the newest kept
    expect(m.temp.fitted.length).toBe(CURVE_POINTS);
    const huge = buildCooldown(input({ temp: many, maxPoints: 1e9 }));
    expect(huge.temp.measured.length).toBe(MAX_MEASURED_POINTS);
  });

  it('the fitted temperature curve reaches the limit at the time timeToReachS gives', () => {
    const m = buildCooldown(input());
    const last = temp().at(-1)!;
    const expected = last.t + timeToReachS(last.mean, 25, 1800, 50) * 1000;
    expect(Math.abs(m.temp.reachAt! - expected)).toBeLessThan(1000);
    // and from the stop, the textbook figure 1800 ln(63/25) s
    expect(Math.abs(m.temp.reachAt! - (STOP + 1800 * Math.log(63 / 25) * 1000))).toBeLessThan(1000);
    const end = m.temp.fitted.at(-1)!;
    expect(end.x).toBe(m.temp.reachAt);
    expect(end.y).toBeCloseTo(50, 6);
    expect(m.temp.limit).toBe(50);
    expect(m.temp.unit).toBe('°C');
    // the curve runs through the newest reading
    const at = m.temp.fitted.reduce((a, p) => (Math.abs(p.x - last.t) < Math.abs(a.x - last.t) ? p : a));
    expect(Math.abs(at.y - coolingTemperature(88, 25, 1800, (at.x - STOP) / 1000))).toBeLessThan(0.05);
  });

  it('a rising curve (heat soak 88 -> 96 °C) gets no forecast, as on the server (shared forecastCooling)', () => {
    const m = buildCooldown(input({ temp: buckets(60, 10, (s) => 96 - 8 * Math.exp(-s / 200)) }));
    expect(m.temp.reachAt).toBeNull();
    expect(m.temp.fitted).toEqual([]);
    expect(m.temp.why).toBe('rising');
    const flat = buildCooldown(input({ temp: buckets(60, 10, () => 62), ambientC: null }));
    expect(flat.temp.reachAt).toBeNull();
    expect(flat.temp.why).toBe('not falling');
  });

  it('with the ambient fitted, the forecast carries a band around it', () => {
    const m = buildCooldown(input({ ambientC: null }));
    expect(m.temp.reachAt).not.toBeNull();
    expect(m.temp.band).not.toBeNull();
    expect(m.temp.band!.earliest).toBeLessThanOrEqual(m.temp.reachAt!);
  });

  it('fits the pressure from where it leaves its plateau and reaches the limit at 100 + 300 ln(95/7) s', () => {
    const m = buildCooldown(input());
    expect(Math.abs(m.pressure.reachAt! - (STOP + (100 + 300 * Math.log(95 / 7)) * 1000))).toBeLessThan(1000);
    expect(m.pressure.fitted.at(-1)!.y).toBeCloseTo(7, 6);
  });

  it('in US units: same crossing time, limit and values in °F and psi (NIST SP 811: °F = 1.8 °C + 32, 1 psi = 6.894 757 kPa)', () => {
    const si = buildCooldown(input());
    const us = buildCooldown(input({ prefs: { temperature: 'degF', pressure: 'psi', volume: 'gal' } }));
    expect(us.temp.limit).toBeCloseTo(122, 9);
    expect(us.temp.unit).toBe('°F');
    expect(us.pressure.unit).toBe('psi');
    expect(us.pressure.limit).toBeCloseTo(7 / 6.894757, 6);
    expect(us.temp.reachAt).toBe(si.temp.reachAt);
  });

  it('a heater set above the limit: no crossing, and says it is the heater', () => {
    const warm = buckets(60, 10, (s) => coolingTemperature(88, 55, 1800, s));
    const m = buildCooldown(input({ temp: warm, heaterSetpointC: 55, ambientC: 20 }));
    expect(m.temp.reachAt).toBeNull();
    expect(m.temp.why).toBe('heater');
    expect(Math.min(...m.temp.fitted.map((p) => p.y))).toBeGreaterThan(55); // levels off above the setpoint, never at the limit
  });

  it('pressure still on its plateau: no crossing, not falling yet', () => {
    const m = buildCooldown(input({ pressure: pressure(8) }));
    expect(m.pressure.reachAt).toBeNull();
    expect(m.pressure.why).toBe('not falling yet');
  });
});

/**
 * The shared cool-down forecast on synthetic curves with a known time constant. The curves follow Newton's
 * law of cooling with a lumped capacitance, T(t) = Ta + (T0 - Ta) e^(-t/tau), and the true crossing time of
 * a limit is t = tau ln((T0 - Ta)/(Tlim - Ta)) (Incropera, DeWitt, Bergman & Lavine, Fundamentals of Heat and
 * Mass Transfer, 6th ed., ch. 5, section 5.1-5.2, lumped capacitance method).
 */
import { forecastCooling, type TimedSample } from '../../../shared/cooling/forecast';
import { coolingTemperature } from '../../../shared/cooling/newton-cooling';

const S = 1000;
const T0 = 88,
  TA = 25,
  TAU = 900,
  LIMIT = 50;
/** True crossing of 50 °C after the stop: 900 ln(63/25) = 832 s. */
const TRUE_CROSS_S = TAU * Math.log((T0 - TA) / (LIMIT - TA));

/** A small seeded generator (mulberry32) with Box-Muller: the same noise every run. */
function noise(seed: number, sd: number): () => number {
  let a = seed >>> 0;
  const u = () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  return () => sd * Math.sqrt(-2 * Math.log(u() + 1e-12)) * Math.cos(2 * Math.PI * u());
}

function curve(toS: number, f: (s: number) => number, everyS = 10, jitter: () => number = () => 0): TimedSample[] {
  const out: TimedSample[] = [];
  for (let s = 0; s <= toS; s += everyS) out.push({ ts: s * S, value: f(s) + jitter() });
  return out;
}
const newton = (s: number) => coolingTemperature(T0, TA, TAU, s);

describe('forecast of the cool-down (shared by the opening check and the chart)', () => {
  it('a clean Newton curve with the ambient measured: the exact crossing, no band', () => {
    const f = forecastCooling(curve(300, newton), LIMIT, TA);
    expect(f.kind).toBe('forecast');
    if (f.kind !== 'forecast') return;
    expect(f.at / S).toBeCloseTo(TRUE_CROSS_S, 0);
    expect(f.earliest).toBe(f.at);
    expect(f.latest).toBe(f.at);
    expect(f.tauS).toBeCloseTo(TAU, 3);
  });

  it('rising (heat soak 88 -> 96 °C after the stop): no forecast, and says it is rising', () => {
    const f = forecastCooling(
      curve(480, (s) => 96 - 8 * Math.exp(-s / 200)),
      LIMIT,
      TA,
    );
    expect(f).toMatchObject({ kind: 'none', why: 'rising' });
  });

  it('rising with a fitted ambient (the case that once said "clear in 120 s"): no forecast', () => {
    const f = forecastCooling(
      curve(480, (s) => 96 - 8 * Math.exp(-s / 200), 10, noise(3, 0.1)),
      LIMIT,
      null,
    );
    expect(f.kind).toBe('none');
  });

  it('flat (held level at 62 °C with noise): no forecast', () => {
    const f = forecastCooling(
      curve(900, () => 62, 10, noise(1, 0.3)),
      LIMIT,
      TA,
    );
    expect(f).toMatchObject({ kind: 'none', why: 'flat' });
  });

  it('heater-held: cooled toward a heater holding 60 °C, now level, with the room at 25 °C: no forecast', () => {
    // the heater setpoint is not known to the check here; the level curve alone must stop the forecast
    const f = forecastCooling(
      curve(5400, (s) => coolingTemperature(T0, 60, 600, s), 10, noise(2, 0.2)),
      LIMIT,
      TA,
    );
    expect(f.kind).toBe('none');
  });

  it('heat soak first, then cooling: forecast from the peak on', () => {
    // 60 s up from 88 to 90 °C, then Newton from 90 °C
    const f = forecastCooling(
      curve(600, (s) => (s < 60 ? 88 + (2 * s) / 60 : coolingTemperature(90, TA, TAU, s - 60))),
      LIMIT,
      TA,
    );
    expect(f.kind).toBe('forecast');
    if (f.kind !== 'forecast') return;
    expect(f.at / S).toBeCloseTo(60 + TAU * Math.log((90 - TA) / (LIMIT - TA)), 0);
  });

  it('noisy (sd 0.3 °C) with the ambient measured: within 5 % of the true crossing', () => {
    for (const seed of [11, 12, 13, 14, 15]) {
      const f = forecastCooling(curve(360, newton, 10, noise(seed, 0.3)), LIMIT, TA);
      expect(f.kind).toBe('forecast');
      if (f.kind === 'forecast') expect(Math.abs(f.at / S - TRUE_CROSS_S) / TRUE_CROSS_S).toBeLessThan(0.05);
    }
  });

  it('ambient fitted from the first 6 to 18 minutes: a band, earliest to latest, that holds the true crossing', () => {
    let held = 0,
      tried = 0;
    for (const minutes of [6, 10, 14, 18]) {
      for (const seed of [21, 22, 23]) {
        // tau 1800 s: the slow cool-down of a big block; crossing at 1800 ln(63/25) = 1664 s
        const tau = 1800,
          truth = tau * Math.log((T0 - TA) / (LIMIT - TA));
        const f = forecastCooling(
          curve(minutes * 60, (s) => coolingTemperature(T0, TA, tau, s), 10, noise(seed, 0.2)),
          LIMIT,
          null,
        );
        if (f.kind !== 'forecast') continue;
        tried++;
        expect(f.ambientFitted).toBe(true);
        expect(f.earliest).toBeLessThanOrEqual(f.at);
        if (f.latest !== null) expect(f.latest).toBeGreaterThanOrEqual(f.at);
        if (f.earliest / S <= truth && (f.latest === null || f.latest / S >= truth)) held++;
      }
    }
    expect(tried).toBeGreaterThanOrEqual(10);
    // a 95 % band: at most one miss in a dozen
    expect(held).toBeGreaterThanOrEqual(tried - 1);
  });

  it('already at or below the limit: reached', () => {
    expect(
      forecastCooling(
        curve(60, () => 45),
        LIMIT,
        TA,
      ),
    ).toEqual({ kind: 'reached' });
  });

  it('levelling off above the limit (ambient 55 °C): no forecast', () => {
    const f = forecastCooling(
      curve(900, (s) => coolingTemperature(T0, 55, TAU, s)),
      LIMIT,
      55,
    );
    expect(f).toMatchObject({ kind: 'none', why: 'levels-off' });
  });
});

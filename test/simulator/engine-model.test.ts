/**
 * The pure engine model: determinism, warm-up, cool-down against the analytic lumped-capacitance
 * solution, --speed scaling, pressure against the cap rating, the standby exercise schedule.
 * Simulated time only: nothing here sleeps.
 */
import { EngineModel, EngineSpec, EXERCISE_MINUTES, THERMOSTAT_OPEN_C, coolTauSeconds, mulberry32 } from '../../simulator/engine-model';

const T0 = Date.UTC(2026, 0, 5, 0, 0, 0); // a Monday, 00:00 UTC

const standby: EngineSpec = { engineId: 7, duty: 'standby', capacityL: 120, capPressureKpa: 103, heaterSetpointC: 40, coolantFamily: 'conventional' };
const continuous: EngineSpec = { engineId: 8, duty: 'continuous', capacityL: 200, capPressureKpa: 110, heaterSetpointC: null, coolantFamily: 'extended-life' };

function run(m: EngineModel, from: number, stepMs: number, steps: number) {
  const out = [];
  for (let i = 1; i <= steps; i++) out.push(m.step(from + i * stepMs));
  return out;
}

describe('seeded PRNG', () => {
  test('mulberry32 is repeatable and spread over [0, 1)', () => {
    const a = mulberry32(42);
    const b = mulberry32(42);
    const xs = Array.from({ length: 10000 }, () => a());
    expect(Array.from({ length: 10000 }, () => b())).toEqual(xs);
    expect(Math.min(...xs)).toBeGreaterThanOrEqual(0);
    expect(Math.max(...xs)).toBeLessThan(1);
    const mean = xs.reduce((s, x) => s + x, 0) / xs.length;
    expect(mean).toBeGreaterThan(0.48); // uniform mean 0.5, sd of the mean ~0.003
    expect(mean).toBeLessThan(0.52);
  });
});

describe('determinism', () => {
  test('same seed, same samples; another seed, other samples', () => {
    const make = (seed: number) => {
      const m = new EngineModel(standby, { seed, startMs: T0, speed: 30 });
      m.setScenario('overheat', T0 + 20_000);
      return run(m, T0, 1000, 300).map((r) => r.sample);
    };
    const a = make(5);
    expect(make(5)).toEqual(a);
    expect(make(6)).not.toEqual(a);
  });

  test('engines in one run differ from each other', () => {
    const a = run(new EngineModel({ ...standby, engineId: 1 }, { seed: 1, startMs: T0 }), T0, 1000, 10);
    const b = run(new EngineModel({ ...standby, engineId: 2 }, { seed: 1, startMs: T0 }), T0, 1000, 10);
    expect(a.map((r) => r.sample.values)).not.toEqual(b.map((r) => r.sample.values));
  });
});

describe('warm-up under load', () => {
  test('a cold engine started at speed 1 reaches the thermostat band (82..88 °C) and stays there', () => {
    const m = new EngineModel(continuous, { seed: 3, startMs: T0, initialTempC: 20 });
    const warm = run(m, T0, 10_000, 6 * 60); // one hour in 10 s steps
    const temps = warm.map((r) => r.sample.values.coolant_temp);
    expect(temps[0]).toBeLessThan(30);
    // The climb is monotonic apart from noise and passes the thermostat opening temperature.
    const firstOpen = temps.findIndex((t) => t >= THERMOSTAT_OPEN_C);
    expect(firstOpen).toBeGreaterThan(0);
    expect(firstOpen * 10).toBeLessThan(40 * 60); // within 40 minutes
    const later = run(m, T0 + 3600_000, 10_000, 6 * 60).map((r) => r.sample.values.coolant_temp);
    expect(Math.min(...later)).toBeGreaterThanOrEqual(82);
    expect(Math.max(...later)).toBeLessThanOrEqual(88);
    expect(warm.every((r) => r.running && r.sample.values.engine_speed > 1400)).toBe(true);
  });

  test('engine speed is 1500 or 1800 rpm when running, 0 when stopped', () => {
    for (let id = 1; id <= 20; id++) {
      const m = new EngineModel({ ...continuous, engineId: id }, { seed: 9, startMs: T0 });
      const rpm = m.step(T0 + 1000).sample.values.engine_speed;
      expect([1500, 1800].some((n) => Math.abs(rpm - n) <= 10)).toBe(true);
      m.setCommand('stop');
      expect(m.step(T0 + 2000).sample.values.engine_speed).toBe(0);
    }
  });
});

describe('cool-down after a stop', () => {
  // Lumped-capacitance model (Newton's law of cooling) of any heat-transfer textbook, e.g.
  // Incropera, DeWitt, Bergman, Lavine, Fundamentals of Heat and Mass Transfer, ch. 5 "Transient
  // conduction", section on the lumped capacitance method: (T - Tinf)/(Ti - Tinf) = exp(-t/tau),
  // and the time to reach a temperature t = tau ln((Ti - Tinf)/(T - Tinf)).
  const Ta = 20;
  const Ti = 85;
  const spec: EngineSpec = { ...continuous, heaterSetpointC: null };
  const tau = coolTauSeconds(spec.capacityL);
  const analytic = (tS: number): number => Ta + (Ti - Ta) * Math.exp(-tS / tau);

  test('the time constant of a large block is 40..90 minutes and grows with capacity', () => {
    expect(coolTauSeconds(30) / 60).toBe(47.5);
    expect(coolTauSeconds(120) / 60).toBe(70);
    expect(coolTauSeconds(400) / 60).toBe(90);
    expect(coolTauSeconds(10) / 60).toBe(42.5);
  });

  test('without noise the model is the analytic solution', () => {
    const m = new EngineModel(spec, { seed: 1, startMs: T0, initialTempC: Ti, ambientMeanC: Ta, ambientAmplitudeC: 0, noise: false });
    m.setCommand('stop');
    const out = run(m, T0, 60_000, 240); // four hours, one-minute steps
    out.forEach((r, i) => expect(r.sample.values.coolant_temp).toBeCloseTo(analytic((i + 1) * 60), 1));
  });

  test('with sensor noise every sample is within 0.6 °C of the analytic solution (5 sd of 0.12 °C)', () => {
    const m = new EngineModel(spec, { seed: 2, startMs: T0, initialTempC: Ti, ambientMeanC: Ta, ambientAmplitudeC: 0 });
    m.setCommand('stop');
    const out = run(m, T0, 5_000, 12 * 240);
    let maxErr = 0;
    out.forEach((r, i) => (maxErr = Math.max(maxErr, Math.abs(r.sample.values.coolant_temp - analytic((i + 1) * 5)))));
    expect(maxErr).toBeLessThan(0.6);
  });

  test('it crosses 50 °C at t = tau ln((Ti - Ta)/(50 - Ta)), within one step', () => {
    const m = new EngineModel(spec, { seed: 1, startMs: T0, initialTempC: Ti, ambientMeanC: Ta, ambientAmplitudeC: 0, noise: false });
    m.setCommand('stop');
    const expectedS = tau * Math.log((Ti - Ta) / (50 - Ta));
    const out = run(m, T0, 10_000, 2000);
    const crossedS = (out.findIndex((r) => r.sample.values.coolant_temp < 50) + 1) * 10;
    expect(Math.abs(crossedS - expectedS)).toBeLessThanOrEqual(10);
  });

  test('with a jacket-water heater the block settles at the heater setpoint, not ambient', () => {
    const m = new EngineModel(standby, { seed: 1, startMs: T0, initialTempC: 88, ambientMeanC: 5, ambientAmplitudeC: 0, noise: false });
    m.setCommand('stop');
    const out = run(m, T0, 60_000, 12 * 60);
    expect(out[out.length - 1].sample.values.coolant_temp).toBe(40);
    expect(Math.min(...out.map((r) => r.sample.values.coolant_temp))).toBeGreaterThanOrEqual(40);
    expect(out[out.length - 1].sample.values.coolant_pressure).toBe(0);
  });
});

describe('--speed scales the time constants', () => {
  test('one wall minute at speed 60 is one physical hour at speed 1', () => {
    const opts = { seed: 4, startMs: T0, initialTempC: 86, ambientMeanC: 15, noise: false };
    const slow = new EngineModel(continuous, { ...opts, speed: 1 });
    const fast = new EngineModel(continuous, { ...opts, speed: 60 });
    slow.setCommand('stop');
    fast.setCommand('stop');
    const a = run(slow, T0, 60_000, 60); // 60 steps of one minute
    const b = run(fast, T0, 1_000, 60); // 60 steps of one second at 60x
    b.forEach((r, i) => {
      expect(r.sample.values.coolant_temp).toBeCloseTo(a[i].sample.values.coolant_temp, 6);
      expect(r.sample.values.coolant_pressure).toBeCloseTo(a[i].sample.values.coolant_pressure, 6);
    });
    // Timestamps stay in wall-clock time.
    expect(b[59].sample.ts - T0).toBe(60_000);
  });

  test('a cool-down at speed 60 follows exp(-t / (tau / 60)) in wall time', () => {
    const Ta = 10;
    const m = new EngineModel({ ...continuous }, { seed: 1, startMs: T0, initialTempC: 85, ambientMeanC: Ta, ambientAmplitudeC: 0, noise: false, speed: 60 });
    m.setCommand('stop');
    const tauWallS = coolTauSeconds(continuous.capacityL) / 60;
    const out = run(m, T0, 1000, 180);
    out.forEach((r, i) => expect(r.sample.values.coolant_temp).toBeCloseTo(Ta + 75 * Math.exp(-(i + 1) / tauWallS), 1));
  });
});

describe('coolant pressure', () => {
  test.each([55, 103, 110])('stays below a %p kPa cap rating through two days of normal running, and builds when hot', (cap) => {
    const m = new EngineModel({ ...continuous, capPressureKpa: cap }, { seed: 11, startMs: T0, initialTempC: 25 });
    const out = run(m, T0, 10_000, 2 * 8640);
    const p = out.map((r) => r.sample.values.coolant_pressure);
    expect(Math.max(...p)).toBeLessThan(cap);
    expect(p[p.length - 1]).toBeGreaterThan(0.6 * cap);
    expect(p[0]).toBeLessThan(1); // cold: about 0 kPa gauge
  });

  test('a stopped, cooled engine reads 0 kPa gauge', () => {
    const m = new EngineModel(continuous, { seed: 1, startMs: T0, initialTempC: 85, ambientMeanC: 15 });
    m.setCommand('stop');
    const out = run(m, T0, 60_000, 8 * 60);
    expect(out[out.length - 1].sample.values.coolant_pressure).toBe(0);
  });
});

describe('run schedule', () => {
  test('a standby set exercises about 30 minutes a week (NFPA 110 ch. 8 asks at least 30 min monthly; weekly is common practice)', () => {
    const m = new EngineModel(standby, { seed: 1, startMs: T0 });
    const out = run(m, T0, 60_000, 7 * 24 * 60);
    const runningMin = out.filter((r) => r.running).length;
    expect(runningMin).toBe(EXERCISE_MINUTES);
  });

  test('at speed 60 the standby week passes in 2.8 wall hours', () => {
    const m = new EngineModel(standby, { seed: 1, startMs: T0, speed: 60 });
    const out = run(m, T0, 1000, (7 * 24 * 3600) / 60);
    expect(out.filter((r) => r.running).length).toBe(EXERCISE_MINUTES);
  });

  test('prime sets run most of the day, continuous sets always', () => {
    const prime = new EngineModel({ ...continuous, duty: 'prime' }, { seed: 1, startMs: T0 });
    const p = run(prime, T0, 60_000, 24 * 60).filter((r) => r.running).length / (24 * 60);
    expect(p).toBeGreaterThan(0.7);
    expect(p).toBeLessThan(1);
    const cont = new EngineModel(continuous, { seed: 1, startMs: T0 });
    expect(run(cont, T0, 60_000, 24 * 60).every((r) => r.running)).toBe(true);
  });

  test('a control command overrides the schedule until set back to auto', () => {
    const m = new EngineModel(standby, { seed: 1, startMs: T0 });
    m.setCommand('run');
    expect(m.step(T0 + 1000).running).toBe(true);
    m.setCommand('auto');
    expect(m.step(T0 + 2000).running).toBe(false);
  });
});

describe('conductivity', () => {
  test('glycol coolant reads 2000..3500 uS/cm and drifts slowly up (common practice, recalled)', () => {
    const m = new EngineModel(continuous, { seed: 1, startMs: T0, noise: false });
    const first = m.step(T0 + 1000).sample.values.coolant_conductivity;
    const out = run(m, T0 + 1000, 3600_000, 24 * 7);
    const last = out[out.length - 1].sample.values.coolant_conductivity;
    expect(first).toBeGreaterThanOrEqual(2000);
    expect(first).toBeLessThanOrEqual(3500);
    expect(last).toBeGreaterThan(first);
    expect(last / first).toBeLessThan(1.05); // slow: under 5 % a week
  });
});

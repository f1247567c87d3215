/**
 * Each scenario must show its fault well within two minutes of wall time at --speed 30, in the
 * terms the alarm rules look for. Simulated time only (the model is stepped, nothing sleeps).
 */
import { EngineModel, EngineSpec, StepResult } from '../../simulator/engine-model';
import { SCENARIO_NAMES, SCENARIOS, STUCK_STOP_S, ScenarioName } from '../../simulator/scenarios';

const T0 = Date.UTC(2026, 0, 7, 3, 0, 0); // a Wednesday night: no standby exercise, prime sets stopped
const SPEED = 30;
const TICK_MS = 1000; // 1 Hz
const WALL_S = 120;
const FAULT_AT_MS = 10_000;

const specs: EngineSpec[] = [
  { engineId: 1, duty: 'standby', capacityL: 120, capPressureKpa: 103, heaterSetpointC: 40, coolantFamily: 'conventional' },
  { engineId: 2, duty: 'standby', capacityL: 40, capPressureKpa: 90, heaterSetpointC: null, coolantFamily: 'extended-life' },
  { engineId: 3, duty: 'prime', capacityL: 250, capPressureKpa: 110, heaterSetpointC: 45, coolantFamily: 'conventional' },
  { engineId: 4, duty: 'continuous', capacityL: 180, capPressureKpa: 103, heaterSetpointC: null, coolantFamily: 'extended-life' },
];

function simulate(spec: EngineSpec, name: ScenarioName, seed = 1): { before: StepResult[]; after: StepResult[] } {
  const m = new EngineModel(spec, { seed, startMs: T0, speed: SPEED });
  m.setScenario(name, T0 + FAULT_AT_MS);
  const before: StepResult[] = [];
  const after: StepResult[] = [];
  for (let ts = T0 + TICK_MS; ts <= T0 + WALL_S * 1000; ts += TICK_MS) {
    const r = m.step(ts);
    (ts < T0 + FAULT_AT_MS ? before : after).push(r);
  }
  return { before, after };
}

const ch = (rs: StepResult[], key: keyof StepResult['sample']['values']) => rs.map((r) => r.sample.values[key]);

describe.each(specs)('engine $engineId ($duty, $capacityL L)', (spec) => {
  test('normal: no fault signature in two minutes', () => {
    const { before, after } = simulate(spec, 'normal');
    const all = [...before, ...after];
    expect(Math.max(...ch(all, 'coolant_temp'))).toBeLessThan(95);
    const c = ch(all, 'coolant_conductivity');
    expect(Math.max(...c) / c[0]).toBeLessThan(1.05);
    expect(all.every((r) => r.publish)).toBe(true);
    expect(Math.max(...ch(all, 'coolant_pressure'))).toBeLessThan(spec.capPressureKpa);
  });

  test('overheat: the engine runs and the coolant climbs past 100 °C towards ~110 °C', () => {
    const { after } = simulate(spec, 'overheat');
    expect(after.every((r) => r.running && r.sample.values.engine_speed > 1400)).toBe(true);
    const t = ch(after, 'coolant_temp');
    const firstOver100 = t.findIndex((x) => x > 100);
    expect(firstOver100).toBeGreaterThanOrEqual(0);
    expect(Math.max(...t)).toBeGreaterThan(105);
    expect(Math.max(...t)).toBeLessThan(116);
    expect(Math.max(...ch(after, 'coolant_pressure'))).toBeLessThan(spec.capPressureKpa); // the cap relieves
  });

  test('leak: pressure falls steadily to ~0 kPa while running, then the temperature climbs', () => {
    const { after } = simulate(spec, 'leak');
    expect(after.every((r) => r.running)).toBe(true);
    const p = ch(after, 'coolant_pressure');
    const peak = Math.max(...p);
    const iPeak = p.indexOf(peak);
    expect(peak).toBeGreaterThan(20);
    expect(p[p.length - 1]).toBeLessThan(2);
    // Falls by more than 10 kPa per wall minute over the 30 s after the peak (about 2 kPa per physical minute at speed 1).
    const i30 = Math.min(iPeak + 30, p.length - 1);
    expect(((p[iPeak] - p[i30]) / ((i30 - iPeak) * TICK_MS)) * 60_000).toBeGreaterThan(10);
    const t = ch(after, 'coolant_temp');
    expect(t[t.length - 1]).toBeGreaterThan(90); // above the regulated 83..86 °C
  });

  test('contamination: conductivity climbs above baseline + 25 %', () => {
    const { before, after } = simulate(spec, 'contamination');
    const base = ch(before, 'coolant_conductivity').reduce((s, x) => s + x, 0) / before.length;
    const c = ch(after, 'coolant_conductivity');
    const firstOver = c.findIndex((x) => x > base * 1.25);
    expect(firstOver).toBeGreaterThanOrEqual(0);
    expect(firstOver).toBeLessThan(60); // within a wall minute of the fault
    expect(c[c.length - 1] / base).toBeGreaterThan(1.4);
  });

  test('stuck-sensor: coolant_temp repeats one value exactly for more than 10 simulated minutes; the engine stops a minute, then runs', () => {
    const { after } = simulate(spec, 'stuck-sensor');
    const t = ch(after, 'coolant_temp');
    expect(new Set(t).size).toBe(1);
    const simMinutes = (after.length * TICK_MS * SPEED) / 60_000;
    expect(simMinutes).toBeGreaterThan(10);
    // held stopped for STUCK_STOP_S physical seconds, then started: the start is what shows the stuck sensor
    const firstRunning = after.findIndex((r) => r.running);
    expect(firstRunning).toBeGreaterThan(0);
    expect(firstRunning * TICK_MS * SPEED).toBeGreaterThanOrEqual(STUCK_STOP_S * 1000);
    expect(after.slice(firstRunning).every((r) => r.running)).toBe(true);
    // The other channels keep moving: it is the sensor, not the engine.
    expect(new Set(ch(after, 'coolant_pressure')).size).toBeGreaterThan(10);
  });

  test('lost-comms: nothing is published for the engine after the fault begins', () => {
    const { before, after } = simulate(spec, 'lost-comms');
    expect(before.every((r) => r.publish)).toBe(true);
    expect(after.every((r) => !r.publish)).toBe(true);
    // Silence of the remaining wall time is far beyond 3x the 1 s interval.
    expect(after.length * TICK_MS).toBeGreaterThan(3 * TICK_MS * 10);
  });
});

describe('heater-failure', () => {
  test("a stopped standby engine's jacket water falls steadily from the heater setpoint toward ambient", () => {
    const spec = specs[0]; // standby, heater at 40 °C
    const { before, after } = simulate(spec, 'heater-failure');
    expect(before.every((r) => !r.running) && after.every((r) => !r.running)).toBe(true);
    const t = ch(after, 'coolant_temp');
    const ambient = ch(after, 'ambient_temp');
    expect(Math.min(...ch(before, 'coolant_temp'))).toBeGreaterThan(39);
    // one physical hour at speed 30: several degrees lost, still above ambient
    expect(t[t.length - 1]).toBeLessThan(36);
    expect(t[t.length - 1]).toBeGreaterThan(ambient[ambient.length - 1]);
    // steady: every 10-sample step (5 physical minutes) is lower than the one before
    for (let i = 10; i < t.length; i += 10) expect(t[i]).toBeLessThan(t[i - 10]);
  });
});

describe('scenario list', () => {
  test('every scenario is described, and the ones that need a running engine say so', () => {
    expect(SCENARIO_NAMES.sort()).toEqual(['contamination', 'heater-failure', 'leak', 'lost-comms', 'normal', 'overheat', 'stuck-sensor']);
    for (const n of SCENARIO_NAMES) expect(SCENARIOS[n].description.length).toBeGreaterThan(5);
    expect(SCENARIO_NAMES.filter((n) => SCENARIOS[n].requiresRunning).sort()).toEqual(['leak', 'overheat', 'stuck-sensor']);
  });

  test('switching back to normal clears the fault', () => {
    const m = new EngineModel(specs[3], { seed: 1, startMs: T0, speed: SPEED });
    m.setScenario('lost-comms', T0);
    expect(m.step(T0 + 1000).publish).toBe(false);
    m.setScenario('normal', T0 + 2000);
    expect(m.step(T0 + 2000).publish).toBe(true);
  });
});

/**
 * The default rule profile against the simulator's engine model at PHYSICAL speed (no time compression,
 * no I/O): the pure model (simulator/engine-model.ts) and the per-engine evaluator (server/services/alarms)
 * run side by side, one sample a second, as the live rule engine would see them.
 * - Normal running, including a cold start from the heater and a cool-down, must raise nothing
 *   (the rules must not cry wolf).
 * - Each fault scenario must raise its matching rule.
 * The integration test (alarms-scenarios.test.ts) runs at --speed 30, where warm-ups are 30 times steeper
 * per wall-clock minute; this test is where warm-ups are judged.
 */
import { CHANNEL_KEYS, type ChannelKey } from '../../shared/channels';
import { DEMO_ENGINES } from '../../seeds/demo-scenario';
import { DEFAULT_RULES, effectiveRules } from '../../server/services/alarms/rule-definitions';
import { EngineEvaluator, type EvalReading } from '../../server/services/alarms/engine-evaluator';
import { EngineModel, type EngineSpec } from '../../simulator/engine-model';
import type { ScenarioName } from '../../simulator/scenarios';

const T0 = Date.UTC(2026, 2, 2, 6, 0, 0); // a Monday morning, outside every standby exercise slot
const MIN = 60_000;

const specs: EngineSpec[] = DEMO_ENGINES.map((e, i) => ({
  engineId: i + 1,
  duty: e.duty,
  capacityL: e.capacityL,
  capPressureKpa: e.capPressureKpa,
  heaterSetpointC: e.heaterSetpointC,
  coolantFamily: e.coolantFamily,
}));

interface Plan {
  at: number;
  command?: 'run' | 'stop' | 'auto';
  scenario?: ScenarioName;
}

/** Step the model once a second from T0 for `minutes`, feed the evaluator, return the raised rule keys with times. */
function drive(spec: EngineSpec, minutes: number, plan: Plan[], rules = DEFAULT_RULES): { rule: string; atMin: number; message: string }[] {
  const model = new EngineModel(spec, { seed: 7, startMs: T0, speed: 1 });
  const glycol = DEMO_ENGINES[spec.engineId - 1];
  const ev = new EngineEvaluator(
    {
      id: spec.engineId,
      glycolType: glycol.glycolType,
      glycolPercent: glycol.glycolPercent,
      baselineFrom: T0,
      baselineValue: null,
      duty: spec.duty,
      heaterSetpointC: spec.heaterSetpointC,
      capPressureKpa: spec.capPressureKpa,
      elevationM: 0,
    },
    effectiveRules(rules, []),
    { startTs: T0 },
  );
  const raised: { rule: string; atMin: number; message: string }[] = [];
  const todo = [...plan].sort((a, b) => a.at - b.at);
  for (let ts = T0 + 1000; ts <= T0 + minutes * MIN; ts += 1000) {
    while (todo.length && T0 + todo[0].at * MIN <= ts) {
      const p = todo.shift()!;
      if (p.command) model.setCommand(p.command);
      if (p.scenario) model.setScenario(p.scenario, ts);
    }
    const r = model.step(ts);
    const hits = r.publish
      ? ev.feed(CHANNEL_KEYS.map((channel: ChannelKey): EvalReading => ({ channel, ts, value: r.sample.values[channel], quality: 0 })))
      : [];
    if (ts % 5000 === 0) hits.push(...ev.tick(ts));
    for (const h of hits) if (h.event.kind === 'raise') raised.push({ rule: h.def.key, atMin: (ts - T0) / MIN, message: h.event.message });
  }
  return raised;
}

describe('normal running at physical speed raises nothing', () => {
  it.each(specs.map((s) => [DEMO_ENGINES[s.engineId - 1].name, s] as const))(
    '%s: 30 min stopped, cold start and 90 min running, 60 min cooling down',
    (_name, spec) => {
      const raised = drive(spec, 180, [
        { at: 0, command: 'stop' },
        { at: 30, command: 'run' },
        { at: 120, command: 'stop' },
      ]);
      expect(raised).toEqual([]);
    },
  );
});

describe('each fault at physical speed raises its matching rule', () => {
  const faults: [ScenarioName, string, number][] = [
    ['overheat', 'coolant_temp_high', 60],
    ['leak', 'coolant_pressure_low_running', 40],
    ['contamination', 'conductivity_high', 40],
    ['stuck-sensor', 'coolant_temp_stuck', 20],
    ['lost-comms', 'no_data', 5],
  ];
  it.each(faults)('%s raises %s within %d minutes of the fault', (scenario, rule, withinMin) => {
    const spec = specs[0]; // Works gen-set A, 180 L
    const raised = drive(spec, 30 + withinMin, [
      { at: 0, command: 'run' },
      { at: 30, scenario },
    ]);
    const hit = raised.find((r) => r.rule === rule);
    expect(hit).toBeDefined();
    expect(hit!.atMin).toBeGreaterThanOrEqual(30);
    expect(raised.filter((r) => r.rule === rule)).toHaveLength(1);
  });
});

describe('heater failure at physical speed', () => {
  it('a stopped standby set with its heater off: heater_not_holding first, then coolant_temp_low_standby (high)', () => {
    const spec = specs[0]; // Works gen-set A, 180 L, heater at 40 °C
    const raised = drive(spec, 150, [
      { at: 0, command: 'stop' },
      { at: 10, scenario: 'heater-failure' },
    ]);
    const heater = raised.find((r) => r.rule === 'heater_not_holding');
    const cold = raised.find((r) => r.rule === 'coolant_temp_low_standby');
    expect(heater).toBeDefined();
    expect(cold).toBeDefined();
    expect(heater!.atMin).toBeGreaterThan(10);
    expect(heater!.atMin).toBeLessThan(cold!.atMin);
    expect(raised.map((r) => r.rule).sort()).toEqual(['coolant_temp_low_standby', 'heater_not_holding']);
  });
});

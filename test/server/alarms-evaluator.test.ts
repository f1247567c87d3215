/** The per-engine evaluator over hand-made reading sequences (default profile, shared rule evaluators). */
import { EngineEvaluator, type EvalReading } from '../../server/services/alarms/engine-evaluator';
import { DEFAULT_RULES, effectiveRules } from '../../server/services/alarms/rule-definitions';

const T0 = Date.UTC(2026, 11, 2, 1, 0, 0);
const engine = { id: 1, glycolType: 'ethylene' as const, glycolPercent: 50, baselineFrom: T0 - 86400_000, baselineValue: 2000 };

/** One sample per second: speed, temperature, pressure. */
function samples(fromS: number, toS: number, temp: (s: number) => number, opts: { rpm?: number; kpa?: number } = {}): EvalReading[] {
  const out: EvalReading[] = [];
  for (let s = fromS; s < toS; s++) {
    const ts = T0 + s * 1000;
    out.push({ channel: 'engine_speed', ts, value: opts.rpm ?? 1800, quality: 0 });
    out.push({ channel: 'coolant_temp', ts, value: temp(s), quality: 0 });
    out.push({ channel: 'coolant_pressure', ts, value: opts.kpa ?? 90, quality: 0 });
  }
  return out;
}
const keys = (hits: { def: { key: string }; event: { kind: string } }[]) => hits.map((h) => `${h.event.kind}:${h.def.key}`);
const noise = (s: number) => 0.3 * Math.sin(s / 3);

describe('engine evaluator with the default profile', () => {
  it('raises high temperature once after the on-delay, not again while it stays high, clears after the off-delay', () => {
    // the step from 85 to 100 °C also trips "rising fast": watch the limit rule alone here
    const ev = new EngineEvaluator(
      engine,
      DEFAULT_RULES.filter((r) => r.key === 'coolant_temp_high'),
    );
    expect(keys(ev.feed(samples(0, 60, (s) => 85 + noise(s))))).toEqual([]);
    // 100 °C: above 98 (warning) but below 103; margin to boiling at 90 kPa gauge is well over 10 °C
    const up = ev.feed(samples(60, 75, (s) => 100 + noise(s)));
    expect(keys(up)).toEqual(['raise:coolant_temp_high']);
    expect(up[0].event.ts).toBe(T0 + 70_000); // condition from 60 s, on-delay 10 s
    expect(keys(ev.feed(samples(75, 200, (s) => 100 + noise(s))))).toEqual([]);
    // back to 97: inside the deadband (98 - 2 = 96): no clear
    expect(keys(ev.feed(samples(200, 300, (s) => 97 + noise(s) * 0.1)))).toEqual([]);
    const down = ev.feed(samples(300, 340, () => 90));
    expect(keys(down)).toEqual(['clear:coolant_temp_high']);
    expect(down[0].event.ts).toBe(T0 + 330_000); // off-delay 30 s
  });

  it('does not chatter when the value hovers around the limit', () => {
    const ev = new EngineEvaluator(engine, DEFAULT_RULES);
    ev.feed(samples(0, 60, () => 85));
    // 97.5 .. 98.5 every few seconds: in and out of the limit, never below the deadband
    const hits = ev.feed(samples(60, 600, (s) => 98 + 0.5 * Math.sign(Math.sin(s / 4))));
    expect(keys(hits).filter((k) => k.endsWith('coolant_temp_high'))).toEqual(['raise:coolant_temp_high']);
  });

  it('low pressure only while running and warm (a cold start sits near 0 kPa gauge)', () => {
    const ev = new EngineEvaluator(engine, DEFAULT_RULES);
    expect(keys(ev.feed(samples(0, 60, () => 40, { rpm: 0, kpa: 5 })))).toEqual([]);
    // running but still cold: the rule is not armed yet
    expect(keys(ev.feed(samples(60, 90, () => 40, { rpm: 1800, kpa: 5 })))).not.toContain('raise:coolant_pressure_low_running');
    const hits = ev.feed(samples(90, 120, () => 85, { rpm: 1800, kpa: 5 }));
    expect(keys(hits)).toContain('raise:coolant_pressure_low_running');
  });

  it('no data after three usual intervals, at least 60 s, by the tick', () => {
    const ev = new EngineEvaluator(engine, DEFAULT_RULES);
    ev.feed(samples(0, 30, () => 80));
    expect(keys(ev.tick(T0 + 80_000))).toEqual([]);
    const hits = ev.tick(T0 + 95_000);
    expect(keys(hits)).toEqual(['raise:no_data']);
    expect(hits[0].event.ts).toBe(T0 + 29_000 + 60_000);
    expect(keys(ev.feed(samples(100, 101, () => 80)))).toEqual(['clear:no_data']);
  });

  it('an engine override changes the limit and can switch a rule off', () => {
    const rules = effectiveRules(DEFAULT_RULES, [
      { rule: 'coolant_temp_high', enabled: true, params: { limit: 92 } },
      { rule: 'no_data', enabled: false, params: null },
    ]);
    const ev = new EngineEvaluator(engine, rules);
    expect(keys(ev.feed(samples(0, 20, () => 94)))).toEqual(['raise:coolant_temp_high']);
    expect(keys(ev.tick(T0 + 3600_000))).toEqual([]);
  });

  it('boiling margin uses the engine glycol and measured pressure', () => {
    // 50 % ethylene glycol at 0 kPa gauge boils near 107 °C (shared/coolant/boiling-point.ts, IAPWS-IF97 + Raoult):
    // 100 °C leaves under 10 °C of margin; at 90 kPa gauge the boiling point is far higher
    const ev = new EngineEvaluator(
      engine,
      DEFAULT_RULES.filter((r) => r.kind === 'boiling_margin'),
    );
    expect(keys(ev.feed(samples(0, 30, () => 100, { kpa: 90 })))).toEqual([]);
    expect(keys(ev.feed(samples(30, 60, () => 100, { kpa: 0 })))).toEqual(['raise:boiling_margin_low']);
  });
});

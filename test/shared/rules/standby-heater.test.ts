/**
 * Standby readiness rules on hand-made sequences:
 * - coolant_temp_low_standby (limit 32 °C / 90 °F, the jacket-water minimum NFPA 110 asks for an emergency
 *   engine, clause 5.3.1 in recent editions, quoted from memory): a stopped standby engine below it for the
 *   delay raises a high-priority alarm whose first step is the heater check; other duties and running engines are not judged.
 * - heater_not_holding (pure rule stepHeaterLoss): jacket water of a stopped engine falling steadily below the heater setpoint.
 */
import { initialHeaterLossState, stepHeaterLoss, type HeaterLossParams } from '../../../shared/rules/heater-loss-rule';
import { EngineEvaluator, type EngineFacts, type EvalReading } from '../../../server/services/alarms/engine-evaluator';
import { DEFAULT_RULES } from '../../../server/services/alarms/rule-definitions';
import { runRule, S, MIN } from './run-rule';

const T0 = Date.UTC(2026, 0, 5, 2, 0, 0);
const facts = (duty: EngineFacts['duty']): EngineFacts => ({
  id: 1,
  glycolType: 'ethylene',
  glycolPercent: 50,
  baselineFrom: T0,
  baselineValue: null,
  duty,
  heaterSetpointC: 40,
  capPressureKpa: 100,
  elevationM: 0,
});

/** Every 10 s for `minutes`: speed, coolant temperature from `temp(min)`. */
function feed(ev: EngineEvaluator, minutes: number, temp: (min: number) => number, rpm = 0) {
  const hits = [];
  for (let t = 0; t <= minutes * 60; t += 10) {
    const ts = T0 + t * S;
    const batch: EvalReading[] = [
      { channel: 'engine_speed', ts, value: rpm, quality: 0 },
      { channel: 'coolant_temp', ts, value: temp(t / 60), quality: 0 },
    ];
    hits.push(
      ...ev
        .feed(batch)
        .filter((h) => h.event.kind === 'raise')
        .map((h) => ({ rule: h.def.key, at: (h.event.ts - T0) / MIN, message: h.event.message, priority: h.def.priority, firstStep: h.def.firstStep })),
    );
  }
  return hits;
}

describe('coolant_temp_low_standby', () => {
  it('is in the default profile with its limit in °C (32 °C / 90 °F), high priority, the heater check as first step', () => {
    const def = DEFAULT_RULES.find((r) => r.key === 'coolant_temp_low_standby')!;
    expect(def).toMatchObject({ kind: 'limit', priority: 'high', params: { direction: 'low', limit: 32, onlyWhenStopped: true, onlyDuty: 'standby' } });
    expect(def.meaning).toMatch(/NFPA 110.*32 °C \(90 °F\).*5\.3\.1.*from memory/);
    expect(def.firstStep).toMatch(/supply and breaker.*thermostat.*hoses/);
  });

  it('a stopped standby engine at 30 °C raises after the 15 min delay, once', () => {
    const hits = feed(new EngineEvaluator(facts('standby'), DEFAULT_RULES), 30, () => 30).filter((h) => h.rule === 'coolant_temp_low_standby');
    expect(hits.map((h) => h.at)).toEqual([15]);
    expect(hits[0].message).toMatch(/30\.0 °C/);
  });

  it('a short dip below the limit (shorter than the delay) raises nothing', () => {
    const hits = feed(new EngineEvaluator(facts('standby'), DEFAULT_RULES), 30, (m) => (m >= 5 && m < 15 ? 30 : 40));
    expect(hits.filter((h) => h.rule === 'coolant_temp_low_standby')).toEqual([]);
  });

  it('not for a prime engine, nor for a running standby engine', () => {
    expect(feed(new EngineEvaluator(facts('prime'), DEFAULT_RULES), 30, () => 30).filter((h) => h.rule === 'coolant_temp_low_standby')).toEqual([]);
    expect(feed(new EngineEvaluator(facts('standby'), DEFAULT_RULES), 30, () => 30, 1800).filter((h) => h.rule === 'coolant_temp_low_standby')).toEqual([]);
  });
});

describe('heater not holding', () => {
  const p: HeaterLossParams = { heaterSetpointC: 40, belowByC: 3, minDropC: 2, windowS: 1800 };
  const stopped = (minutes: number, temp: (m: number) => number, t0 = 0) =>
    Array.from({ length: minutes * 6 + 1 }, (_, i) => ({ ts: t0 + i * 10 * S, value: temp(i / 6), quality: 0, running: false }));

  it('a steady fall below the setpoint (heater off: Newton cooling toward 15 °C, tau 85 min) raises once the window is full', () => {
    const { events } = runRule(
      stepHeaterLoss,
      initialHeaterLossState(),
      stopped(60, (m) => 15 + 25 * Math.exp(-m / 85)),
      p,
    );
    expect(events.map((e) => e.kind)).toEqual(['raise']);
    expect(events[0].ts).toBe(30 * MIN);
    expect(events[0].message).toMatch(/falling steadily.*below the heater setpoint of 40 °C/);
  });

  it('a heater holding at its setpoint, and a hot engine cooling down to it, raise nothing', () => {
    expect(
      runRule(
        stepHeaterLoss,
        initialHeaterLossState(),
        stopped(120, (m) => 40 + 0.3 * Math.sin(m)),
        p,
      ).events,
    ).toEqual([]);
    expect(
      runRule(
        stepHeaterLoss,
        initialHeaterLossState(),
        stopped(120, (m) => Math.max(40, 85 - m)),
        p,
      ).events,
    ).toEqual([]);
  });

  it('clears when the heater brings the water back; no heater, no rule; running resets it', () => {
    const seq = [...stopped(40, (m) => 15 + 25 * Math.exp(-m / 85)), ...stopped(30, (m) => 31 + m / 2, 41 * MIN)];
    expect(runRule(stepHeaterLoss, initialHeaterLossState(), seq, p).events.map((e) => e.kind)).toEqual(['raise', 'clear']);
    expect(
      runRule(
        stepHeaterLoss,
        initialHeaterLossState(),
        stopped(60, (m) => 40 - m / 5),
        { ...p, heaterSetpointC: null },
      ).events,
    ).toEqual([]);
    const running = stopped(60, (m) => 40 - m / 5).map((r) => ({ ...r, running: true }));
    expect(runRule(stepHeaterLoss, initialHeaterLossState(), running, p).events).toEqual([]);
  });

  it('keeps about one point a minute', () => {
    const { state } = runRule(
      stepHeaterLoss,
      initialHeaterLossState(),
      stopped(240, () => 40),
      p,
    );
    expect(state.points.length).toBeLessThanOrEqual(32);
  });
});

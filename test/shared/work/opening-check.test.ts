import { openingCheck, OpeningCheckInput, TimedValue, LOCKOUT_REASON, pressureFalling } from '../../../shared/work/opening-check';
import { coolingTemperature } from '../../../shared/cooling/newton-cooling';

// Limits under test are the product defaults: 50 °C (common guidance of the trade, see the
// reference notes), 7 kPa gauge, stopped 600 s, held 120 s, stale after 60 s.
// Expected prediction times come from Newton's law t = tau ln((T0 - Ta)/(Tth - Ta)).

const S = 1000;
const NOW = Date.UTC(2026, 2, 10, 14, 0, 0);

interface Scenario {
  stoppedAgoS: number; // engine stopped this long before NOW
  tempAt: (sinceStopS: number) => number;
  pressureAt: (sinceStopS: number) => number;
  everyS?: number;
  lastAgoS?: number; // age of the last reading (staleness)
  historyS?: number; // how far back readings go
}

function scenario(sc: Scenario): OpeningCheckInput['readings'] {
  const every = sc.everyS ?? 10;
  const lastAgo = sc.lastAgoS ?? 0;
  const start = NOW - (sc.historyS ?? sc.stoppedAgoS + 1800) * S;
  const stopTs = NOW - sc.stoppedAgoS * S;
  const t: TimedValue[] = [],
    p: TimedValue[] = [],
    e: TimedValue[] = [];
  for (let ts = start; ts <= NOW - lastAgo * S; ts += every * S) {
    const since = (ts - stopTs) / 1000;
    const running = ts < stopTs;
    e.push({ ts, value: running ? 1500 : 0 });
    t.push({ ts, value: running ? 88 : sc.tempAt(since) });
    p.push({ ts, value: running ? 95 : sc.pressureAt(since) });
  }
  return { coolant_temp: t, coolant_pressure: p, engine_speed: e };
}

const cooled: Scenario = { stoppedAgoS: 3600, tempAt: (s) => coolingTemperature(88, 25, 1800, s), pressureAt: (s) => (s < 600 ? 95 * (1 - s / 600) : 0) };
const base = (over: Partial<OpeningCheckInput> = {}): OpeningCheckInput => ({
  readings: scenario(cooled),
  settings: { ambientC: 25 },
  lockoutConfirmed: true,
  ...over,
});
const cond = (r: ReturnType<typeof openingCheck>, name: string) => r.conditions.find((c) => c.name === name)!;

describe('opening check', () => {
  it('clear when stopped long enough, cool, depressurised, fresh, locked out and held', () => {
    const r = openingCheck(base(), NOW);
    expect(r.clear).toBe(true);
    expect(r.stale).toBe(false);
    expect(r.clearAt).toBe(NOW);
    expect(r.reasons).toEqual([]);
    expect(r.conditions.map((c) => c.name)).toEqual([
      'engine-stopped',
      'coolant-temperature',
      'coolant-pressure',
      'telemetry-fresh',
      'lockout-confirmed',
      'held',
    ]);
    expect(cond(r, 'coolant-temperature')).toMatchObject({ met: true, limit: 50, unit: '°C' });
    expect(cond(r, 'coolant-pressure')).toMatchObject({ met: true, value: 0, limit: 7, unit: 'kPa' });
  });

  it('engine running alone: not clear, no prediction', () => {
    const readings = scenario(cooled);
    readings.engine_speed[readings.engine_speed.length - 1] = { ts: NOW, value: 1200 };
    const r = openingCheck(base({ readings }), NOW);
    expect(r.clear).toBe(false);
    expect(cond(r, 'engine-stopped')).toMatchObject({ met: false, value: 0 });
    expect(r.clearAt).toBeNull();
    expect(r.reasons.join(' ')).toMatch(/Engine running \(1200 rpm\)/);
  });

  it('not stopped for long enough alone: clear predicted at stop + minStopped + hold', () => {
    const cool: Scenario = { stoppedAgoS: 300, tempAt: () => 40, pressureAt: () => 0 };
    const r = openingCheck(base({ readings: scenario(cool) }), NOW);
    expect(r.clear).toBe(false);
    expect(cond(r, 'engine-stopped')).toMatchObject({ met: false, value: 300, limit: 600, unit: 's' });
    expect(r.clearAt).toBe(NOW - 300 * S + 600 * S + 120 * S);
  });

  it('the stop from the stored record counts when the readings passed in begin later (a gap, a cache)', () => {
    // readings only for the last 4 min, all stopped and cold; the record says the stop was 3 days ago
    const recent: Scenario = { stoppedAgoS: 3 * 86400, tempAt: () => 22, pressureAt: () => 0, historyS: 240 };
    const without = openingCheck(base({ readings: scenario(recent) }), NOW);
    expect(cond(without, 'engine-stopped')).toMatchObject({ met: false, value: 240 });
    expect(without.reasons.join(' ')).toContain('Engine stopped for 4.0 min; needs 10.0 min.');
    const withRecord = openingCheck(base({ readings: scenario(recent), stoppedSinceTs: NOW - 3 * 86400 * S }), NOW);
    expect(cond(withRecord, 'engine-stopped')).toMatchObject({ met: true, value: 3 * 86400 });
    expect(withRecord.clear).toBe(true);
  });

  it('a run seen in the readings after the recorded stop wins over the record', () => {
    const readings = scenario({ stoppedAgoS: 300, tempAt: () => 40, pressureAt: () => 0 });
    const r = openingCheck(base({ readings, stoppedSinceTs: NOW - 86400 * S }), NOW);
    expect(cond(r, 'engine-stopped')).toMatchObject({ met: false, value: 300 });
  });

  it('temperature alone above the limit: not clear', () => {
    const hot: Scenario = { ...cooled, tempAt: () => 51 };
    const r = openingCheck(base({ readings: scenario(hot) }), NOW);
    expect(r.clear).toBe(false);
    expect(r.conditions.filter((c) => !c.met).map((c) => c.name)).toEqual(['coolant-temperature', 'held']);
    expect(r.reasons[0]).toMatch(/51.0 °C is above the safe opening temperature 50 °C/);
  });

  it('pressure alone above the limit: not clear', () => {
    const pressed: Scenario = { ...cooled, pressureAt: () => 12 };
    const r = openingCheck(base({ readings: scenario(pressed) }), NOW);
    expect(r.clear).toBe(false);
    expect(r.conditions.filter((c) => !c.met).map((c) => c.name)).toEqual(['coolant-pressure', 'held']);
    expect(r.clearAt).toBeNull(); // flat pressure: not falling, no prediction
    expect(r.reasons.join(' ')).toMatch(/not falling/);
  });

  it('lockout not confirmed alone: not clear, cites OSHA 29 CFR 1910.147', () => {
    const r = openingCheck(base({ lockoutConfirmed: false }), NOW);
    expect(r.clear).toBe(false);
    expect(r.conditions.filter((c) => !c.met).map((c) => c.name)).toEqual(['lockout-confirmed']);
    expect(r.reasons).toEqual([LOCKOUT_REASON]);
    expect(LOCKOUT_REASON).toMatch(/OSHA 29 CFR 1910\.147/);
  });

  it('stale data: never clear by itself, no prediction', () => {
    const r = openingCheck(base({ readings: scenario({ ...cooled, lastAgoS: 90 }) }), NOW);
    expect(r.clear).toBe(false);
    expect(r.stale).toBe(true);
    expect(r.clearAt).toBeNull();
    expect(cond(r, 'telemetry-fresh')).toMatchObject({ met: false, limit: 60, unit: 's' });
    expect(cond(r, 'telemetry-fresh').value as number).toBeGreaterThanOrEqual(90);
  });

  it('a missing channel (no pressure at all) is stale, and bad-quality or future readings do not count', () => {
    const readings = scenario(cooled);
    const noPressure = openingCheck(base({ readings: { ...readings, coolant_pressure: [] } }), NOW);
    expect(noPressure).toMatchObject({ clear: false, stale: true });
    expect(noPressure.reasons[0]).toMatch(/No live data for coolant pressure/);
    const withBad = { ...readings, coolant_temp: [...readings.coolant_temp, { ts: NOW, value: 140, quality: 1 }, { ts: NOW + 5 * S, value: 120 }] };
    expect(openingCheck(base({ readings: withBad }), NOW).clear).toBe(true);
    const onlyBadFresh = { ...readings, coolant_pressure: readings.coolant_pressure.map((r) => (r.ts > NOW - 90 * S ? { ...r, quality: 1 } : r)) };
    expect(openingCheck(base({ readings: onlyBadFresh }), NOW).stale).toBe(true);
  });

  it('hold time: conditions met for less than holdS are not clear; clear once held', () => {
    // Temperature crosses 50 °C 60 s before NOW.
    const crossing: Scenario = { stoppedAgoS: 3600, tempAt: (s) => (s < 3540 ? 52 : 49), pressureAt: () => 0 };
    const readings = scenario(crossing);
    const r = openingCheck(base({ readings }), NOW);
    expect(r.clear).toBe(false);
    expect(cond(r, 'held')).toMatchObject({ met: false, value: 60, limit: 120 });
    expect(r.clearAt).toBe(NOW + 60 * S);
    // 60 s later, with the readings continuing, it is clear.
    const later = NOW + 60 * S;
    const more = (l: TimedValue[], v: number) => [...l, ...[10, 20, 30, 40, 50, 60].map((d) => ({ ts: NOW + d * S, value: v }))];
    const r2 = openingCheck(
      base({
        readings: {
          coolant_temp: more(readings.coolant_temp, 49),
          coolant_pressure: more(readings.coolant_pressure, 0),
          engine_speed: more(readings.engine_speed, 0),
        },
      }),
      later,
    );
    expect(r2.clear).toBe(true);
  });

  it('heater setpoint above the limit: no clear time, says why', () => {
    const warm: Scenario = { stoppedAgoS: 7200, tempAt: (s) => coolingTemperature(88, 55, 1800, s), pressureAt: () => 0 };
    const r = openingCheck(base({ readings: scenario(warm), settings: { heaterSetpointC: 55, ambientC: 20 } }), NOW);
    expect(r.clear).toBe(false);
    expect(r.clearAt).toBeNull();
    expect(r.reasons.join(' ')).toMatch(/heater is set to 55 °C, at or above the safe opening temperature 50 °C/);
  });
});

describe('opening check prediction from synthetic cooling data', () => {
  let seed = 99;
  const noise = () => {
    seed = (seed * 1103515245 + 12345) % 2147483648;
    return (seed / 2147483648 - 0.5) * 0.4;
  }; // ±0.2 °C

  it('cooling toward ambient 25 °C with tau 1800 s: clear at stop + 1800 ln(60/25) s + hold', () => {
    const sc: Scenario = { stoppedAgoS: 1200, tempAt: (s) => coolingTemperature(85, 25, 1800, s) + noise(), pressureAt: () => 0 };
    const r = openingCheck(base({ readings: scenario(sc), settings: { ambientC: 25 } }), NOW);
    const expected = NOW - 1200 * S + 1800 * Math.log(60 / 25) * S + 120 * S;
    expect(r.clear).toBe(false);
    expect(Math.abs(r.clearAt! - expected)).toBeLessThan(30 * S);
  });

  it('heat soak after the stop (88 -> 96 °C, still rising at 95.9 °C): no forecast, and says it is rising', () => {
    const sc: Scenario = { stoppedAgoS: 900, tempAt: (s) => 96 - 8 * Math.exp(-s / 200), pressureAt: () => 0 };
    for (const ambientC of [25, null]) {
      const r = openingCheck(base({ readings: scenario(sc), settings: { ambientC } }), NOW);
      expect(r.clearAt).toBeNull();
      expect(r.forecast).toBeNull();
      expect(r.reasons.join(' ')).toMatch(/rising|not falling/);
    }
  });

  it('ambient not measured: a forecast with a band, earliest <= forecast <= latest', () => {
    const sc: Scenario = { stoppedAgoS: 900, tempAt: (s) => coolingTemperature(85, 25, 1800, s), pressureAt: () => 0 };
    const r = openingCheck(base({ readings: scenario(sc), settings: { ambientC: null } }), NOW);
    expect(r.forecast).not.toBeNull();
    expect(r.forecast!.ambientFitted).toBe(true);
    expect(r.forecast!.earliest).toBeLessThanOrEqual(r.clearAt!);
    if (r.forecast!.latest !== null) expect(r.forecast!.latest).toBeGreaterThanOrEqual(r.clearAt!);
    // Newton, true crossing: stop + 1800 ln(60/25) s, plus the hold, inside the band
    const truth = NOW - 900 * S + 1800 * Math.log(60 / 25) * S + 120 * S;
    expect(r.forecast!.earliest).toBeLessThanOrEqual(truth + S);
    if (r.forecast!.latest !== null) expect(r.forecast!.latest).toBeGreaterThanOrEqual(truth - S);
  });

  it('cooling toward a heater setpoint of 40 °C: 1800 ln(45/10) s after the stop, plus hold', () => {
    const sc: Scenario = { stoppedAgoS: 1200, tempAt: (s) => coolingTemperature(85, 40, 1800, s) + noise(), pressureAt: () => 0 };
    const r = openingCheck(base({ readings: scenario(sc), settings: { heaterSetpointC: 40, ambientC: 22 } }), NOW);
    const expected = NOW - 1200 * S + 1800 * Math.log(45 / 10) * S + 120 * S;
    expect(Math.abs(r.clearAt! - expected)).toBeLessThan(60 * S);
  });

  it('pressure decaying toward zero is predicted too; the later of the two wins', () => {
    const sc: Scenario = { stoppedAgoS: 900, tempAt: () => 45, pressureAt: (s) => 60 * Math.exp(-s / 600) };
    const r = openingCheck(base({ readings: scenario(sc) }), NOW);
    const expected = NOW - 900 * S + 600 * Math.log(60 / 7) * S + 120 * S;
    expect(Math.abs(r.clearAt! - expected)).toBeLessThan(5 * S);
  });

  // Right after a stop the pressure sits at the cap's relief level while the coolant is still hot, then falls.
  // Hand-made: flat at 95 kPa for 200 s, then 95 e^(-(s-200)/100). Newton's form gives the crossing of 7 kPa
  // at 200 + 100 ln(95/7) s after the stop; a fit over the flat stretch too would read as barely falling.
  const flatThenFalling = (s: number) => (s < 200 ? 95 : 95 * Math.exp(-(s - 200) / 100));

  it('pressure held flat after the stop: the fit starts where it begins to fall', () => {
    const sc: Scenario = { stoppedAgoS: 300, tempAt: () => 45, pressureAt: flatThenFalling, everyS: 5 };
    const r = openingCheck(base({ readings: scenario(sc), settings: { ambientC: 25, minStoppedS: 60 } }), NOW);
    const expected = NOW - 300 * S + (200 + 100 * Math.log(95 / 7)) * S + 120 * S;
    expect(r.clear).toBe(false);
    expect(Math.abs(r.clearAt! - expected)).toBeLessThan(10 * S);
    const since = scenario(sc).coolant_pressure.filter((p) => p.ts >= NOW - 300 * S);
    expect(pressureFalling(since)[0].ts).toBe(NOW - 300 * S + 200 * S); // the last reading on the plateau
  });

  it('pressure still on its plateau: no prediction yet, and says so', () => {
    const sc: Scenario = { stoppedAgoS: 150, tempAt: () => 45, pressureAt: flatThenFalling, everyS: 5 };
    const r = openingCheck(base({ readings: scenario(sc), settings: { ambientC: 25, minStoppedS: 60 } }), NOW);
    expect(r.clearAt).toBeNull();
    expect(r.reasons.join(' ')).toMatch(/not falling yet \(still near 95.0 kPa since the stop\)/);
  });

  it('gauge pressure following a cooling temperature, capped at relief: predicted on the late (safe) side', () => {
    // p = 1.778 (T - 40 °C) kPa capped at 97 kPa (a closed system: pressure follows temperature; common practice
    // for the shape, invented figures); T cools from 100 °C toward 25 °C with tau 1800 s (Newton).
    const T = (s: number) => coolingTemperature(100, 25, 1800, s);
    const p = (s: number) => Math.max(0, Math.min(97, (80 / 45) * (T(s) - 40)));
    const sc: Scenario = { stoppedAgoS: 900, tempAt: () => 45, pressureAt: p };
    const r = openingCheck(base({ readings: scenario(sc), settings: { ambientC: 25, minStoppedS: 60 } }), NOW);
    // true crossing of 7 kPa: T = 40 + 7 / 1.778 °C, at 1800 ln(75 / (T - 25)) s after the stop
    const trueCross = NOW - 900 * S + 1800 * Math.log(75 / (40 + (7 * 45) / 80 - 25)) * S + 120 * S;
    expect(r.clearAt!).toBeGreaterThanOrEqual(trueCross);
    // late (the exponential toward 0 kPa falls slower near zero than this pressure does), but less than twice the wait
    expect(r.clearAt! - trueCross).toBeLessThan(trueCross - NOW);
  });
});

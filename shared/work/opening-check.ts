/**
 * The opening check: may the cooling system be opened now?
 * All of these, together, held for `holdS`: the engine stopped and not run for `minStoppedS`;
 * coolant at or below the safe opening temperature; coolant pressure at or below the limit
 * (about zero gauge); telemetry fresh; lockout/tagout confirmed by the technician.
 * Stale or missing data is never clear: the check never opens by itself.
 * It also predicts when it will be clear, from a Newton cooling fit over the readings since
 * the engine stopped. This is an aid, not a permission: the engine maker's instructions,
 * site procedures and local codes come first.
 */
import { RUNNING_RPM } from '../channels';
import { forecastCooling } from '../cooling/forecast';
import { fitCooling, timeToReachS } from '../cooling/newton-cooling';

export interface TimedValue {
  ts: number;
  value: number;
  /** 0 good (default), 1 bad: bad readings are ignored. */
  quality?: number;
}

export interface OpeningSettings {
  /** °C, default 50 (common guidance of the trade: open only below about 50 °C). */
  safeOpenTempC: number;
  /** kPa gauge, default 7 (about 1 psi: "zero gauge" with room for sensor offset). */
  maxPressureKpa: number;
  /** Engine stopped at least this long, default 600 s. */
  minStoppedS: number;
  /** All conditions held together this long, default 120 s. */
  holdS: number;
  /** A channel whose last reading is older than this is stale, default 60 s. */
  staleAfterS: number;
  /** Jacket-water heater setpoint, °C; null when the engine has none. */
  heaterSetpointC: number | null;
  /** Ambient (engine room) temperature, °C, when known. */
  ambientC: number | null;
  /** Above this speed the engine counts as running. */
  runningRpm: number;
}

export const DEFAULT_OPENING_SETTINGS: Readonly<OpeningSettings> = Object.freeze({
  safeOpenTempC: 50,
  maxPressureKpa: 7,
  minStoppedS: 600,
  holdS: 120,
  staleAfterS: 60,
  heaterSetpointC: null,
  ambientC: null,
  runningRpm: RUNNING_RPM,
});

export interface OpeningCheckInput {
  readings: { coolant_temp: TimedValue[]; coolant_pressure: TimedValue[]; engine_speed: TimedValue[] };
  settings?: Partial<OpeningSettings>;
  lockoutConfirmed: boolean;
  /**
   * From the stored record: ms of the first engine-speed reading after the last reading that showed the
   * engine running (null or absent: not known). The readings passed in may begin later (a cache, a gap
   * in the data) or miss a short run; when no reading passed in shows it running since, the stop counts from here.
   */
  stoppedSinceTs?: number | null;
}

export type OpeningConditionName = 'engine-stopped' | 'coolant-temperature' | 'coolant-pressure' | 'telemetry-fresh' | 'lockout-confirmed' | 'held';

export interface OpeningCondition {
  name: OpeningConditionName;
  met: boolean;
  /** engine-stopped: seconds stopped; temperature °C; pressure kPa; telemetry: age of the oldest latest reading, s; held: seconds held. */
  value: number | boolean | null;
  limit: number | boolean | null;
  unit: string;
  detail?: string;
}

export interface OpeningCheckResult {
  clear: boolean;
  conditions: OpeningCondition[];
  /** ms when the check is forecast to become clear (now when clear), null when it cannot be forecast. */
  clearAt: number | null;
  /**
   * The forecast's band, earliest to latest (latest null: a fit as good as the best never clears). Equal
   * to clearAt when the ambient is measured; wider when it had to be fitted. Null without a forecast.
   */
  forecast: { at: number; earliest: number; latest: number | null; ambientFitted: boolean } | null;
  reasons: string[];
  stale: boolean;
}

export const LOCKOUT_REASON =
  'Lockout/tagout not confirmed: isolate the engine (starting system, fuel, heater supply) and relieve stored energy, ' +
  'including cooling-system pressure, before opening (OSHA 29 CFR 1910.147(d)(4) and (d)(5)).';

function good(list: readonly TimedValue[] | undefined, now: number): TimedValue[] {
  return (list ?? []).filter((r) => (r.quality ?? 0) === 0 && Number.isFinite(r.value) && Number.isFinite(r.ts) && r.ts <= now).sort((a, b) => a.ts - b.ts);
}

/** ts of the first reading of the trailing run in which `ok` holds and no gap exceeds maxGapMs; null if the latest is not ok. */
function trailingRunStart(list: readonly TimedValue[], ok: (v: number) => boolean, maxGapMs: number): number | null {
  if (!list.length || !ok(list[list.length - 1].value)) return null;
  let start = list.length - 1;
  while (start > 0 && ok(list[start - 1].value) && list[start].ts - list[start - 1].ts <= maxGapMs) start--;
  return list[start].ts;
}

const fmt = (n: number, d = 1) => n.toFixed(d);
/** Durations of minutes read in minutes everywhere in the check (one decimal): 235 s -> "3.9". */
export const minutesText = (seconds: number) => (seconds / 60).toFixed(1);

/** Readings within this of the highest since the stop count as its plateau: about 5 sigma of a gauge's noise, or 3 %. */
export const PRESSURE_PLATEAU_TOL_KPA = 2;

/**
 * The pressure readings since the stop from the last one still on the plateau onward. Right after a stop
 * the hot coolant holds the pressure at the cap's relief level for a while; only when the coolant has cooled
 * enough does the gauge pressure fall with its temperature. A decay fitted over the flat stretch reads as
 * barely falling and predicts far too late, so the fit starts where the fall starts.
 * Fitted from there toward 0 kPa it stays on the late (safe) side while the system's pressure would settle at
 * or below zero gauge: a gauge pressure that follows a cooling temperature falls faster, in relative terms,
 * as it nears zero than the fitted exponential does.
 */
export function pressureFalling(sinceStop: readonly TimedValue[]): TimedValue[] {
  if (!sinceStop.length) return [];
  const peak = Math.max(...sinceStop.map((r) => r.value));
  const floor = peak - Math.max(PRESSURE_PLATEAU_TOL_KPA, 0.03 * Math.abs(peak));
  let i = sinceStop.length - 1;
  while (i > 0 && sinceStop[i].value < floor) i--;
  return sinceStop.slice(i);
}

export function openingCheck(input: OpeningCheckInput, now: number): OpeningCheckResult {
  const s: OpeningSettings = { ...DEFAULT_OPENING_SETTINGS, ...(input.settings ?? {}) };
  const temp = good(input.readings.coolant_temp, now);
  const pres = good(input.readings.coolant_pressure, now);
  const speed = good(input.readings.engine_speed, now);
  const reasons: string[] = [];
  const maxGap = s.staleAfterS * 1000;
  const last = (l: TimedValue[]) => (l.length ? l[l.length - 1] : null);
  const lt = last(temp),
    lp = last(pres),
    ls = last(speed);

  // Freshness
  const ages = [lt, lp, ls].map((r) => (r ? (now - r.ts) / 1000 : Infinity));
  const missing = (['coolant temperature', 'coolant pressure', 'engine speed'] as const).filter((_, i) => ages[i] === Infinity);
  const staleNames = (['coolant temperature', 'coolant pressure', 'engine speed'] as const).filter((_, i) => ages[i] !== Infinity && ages[i] > s.staleAfterS);
  const stale = missing.length > 0 || staleNames.length > 0;
  const oldest = Math.max(...ages);
  if (missing.length) reasons.push(`No live data for ${missing.join(', ')}: the check cannot be clear without it.`);
  if (staleNames.length)
    reasons.push(`Telemetry stale (${staleNames.join(', ')} older than ${s.staleAfterS} s): the check cannot be clear until fresh data arrives.`);

  // Engine stopped
  const isStopped = (v: number) => v <= s.runningRpm;
  let stoppedSince = trailingRunStart(speed, isStopped, maxGap);
  const recorded = input.stoppedSinceTs;
  if (stoppedSince !== null && typeof recorded === 'number' && Number.isFinite(recorded) && recorded <= now) {
    // the record knows the real stop: earlier when the series passed in only starts later (a gap, a
    // cache); later when a short run fell between the series' samples. A run in the series since wins.
    if (!speed.some((r) => r.ts >= recorded && !isStopped(r.value))) stoppedSince = recorded;
  }
  const stoppedForS = stoppedSince === null ? 0 : (now - stoppedSince) / 1000;
  const stoppedMet = stoppedSince !== null && stoppedForS >= s.minStoppedS;
  if (ls && !isStopped(ls.value)) reasons.push(`Engine running (${fmt(ls.value, 0)} rpm).`);
  else if (ls && !stoppedMet) reasons.push(`Engine stopped for ${minutesText(stoppedForS)} min; needs ${minutesText(s.minStoppedS)} min.`);

  // Temperature and pressure
  const tempOk = (v: number) => v <= s.safeOpenTempC;
  const presOk = (v: number) => v <= s.maxPressureKpa;
  const tempMet = lt !== null && tempOk(lt.value);
  const presMet = lp !== null && presOk(lp.value);
  if (lt && !tempMet) reasons.push(`Coolant ${fmt(lt.value)} °C is above the safe opening temperature ${s.safeOpenTempC} °C.`);
  if (lp && !presMet) reasons.push(`Coolant pressure ${fmt(lp.value)} kPa is above ${s.maxPressureKpa} kPa gauge.`);

  // Hold: every measured condition continuously met since metSince
  const tempSince = trailingRunStart(temp, tempOk, maxGap);
  const presSince = trailingRunStart(pres, presOk, maxGap);
  const dataMet = !stale && stoppedMet && tempMet && presMet;
  const metSince = dataMet ? Math.max(stoppedSince! + s.minStoppedS * 1000, tempSince!, presSince!) : null;
  const heldS = metSince === null ? 0 : (now - metSince) / 1000;
  const heldMet = dataMet && heldS >= s.holdS;
  if (dataMet && !heldMet) reasons.push(`All measured conditions met for ${minutesText(heldS)} min; they must hold for ${minutesText(s.holdS)} min.`);
  if (!input.lockoutConfirmed) reasons.push(LOCKOUT_REASON);

  const conditions: OpeningCondition[] = [
    {
      name: 'engine-stopped',
      met: stoppedMet,
      value: stoppedForS,
      limit: s.minStoppedS,
      unit: 's',
      detail: ls ? (isStopped(ls.value) ? `${fmt(ls.value, 0)} rpm` : `running at ${fmt(ls.value, 0)} rpm`) : 'no data',
    },
    { name: 'coolant-temperature', met: tempMet, value: lt?.value ?? null, limit: s.safeOpenTempC, unit: '°C' },
    { name: 'coolant-pressure', met: presMet, value: lp?.value ?? null, limit: s.maxPressureKpa, unit: 'kPa' },
    { name: 'telemetry-fresh', met: !stale, value: Number.isFinite(oldest) ? oldest : null, limit: s.staleAfterS, unit: 's' },
    { name: 'lockout-confirmed', met: input.lockoutConfirmed, value: input.lockoutConfirmed, limit: true, unit: '' },
    { name: 'held', met: heldMet, value: heldS, limit: s.holdS, unit: 's' },
  ];
  const clear = conditions.every((c) => c.met);
  let band: { earliest: number; latest: number | null; ambientFitted: boolean } = { earliest: 0, latest: 0, ambientFitted: false };
  const clearAt = clear ? now : predictClearAt();
  const forecast =
    clear || clearAt === null
      ? null
      : {
          at: clearAt,
          earliest: Math.min(clearAt, band.earliest),
          latest: band.latest === null ? null : Math.max(clearAt, band.latest),
          ambientFitted: band.ambientFitted,
        };
  return { clear, conditions, clearAt, forecast, reasons, stale };

  function predictClearAt(): number | null {
    if (stale) {
      reasons.push('No forecast while data is missing or stale.');
      return null;
    }
    if (stoppedSince === null) {
      reasons.push('No forecast until the engine has stopped.');
      return null;
    }
    const times: number[] = [stoppedSince + s.minStoppedS * 1000];
    let tempBand: { at: number; earliest: number; latest: number | null; ambientFitted: boolean } | null = null;
    // Temperature
    if (tempMet) times.push(tempSince!);
    else {
      const candidates = [s.heaterSetpointC, s.ambientC].filter((v): v is number => v !== null && Number.isFinite(v));
      const towards = candidates.length ? Math.max(...candidates) : null;
      if (s.heaterSetpointC !== null && s.heaterSetpointC >= s.safeOpenTempC) {
        reasons.push(
          `The jacket-water heater is set to ${s.heaterSetpointC} °C, at or above the safe opening temperature ${s.safeOpenTempC} °C: the coolant will not cool below it until the heater is switched off (and locked out).`,
        );
        return null;
      }
      if (towards !== null && towards >= s.safeOpenTempC) {
        reasons.push(`Ambient ${towards} °C is at or above the safe opening temperature ${s.safeOpenTempC} °C: the coolant will not cool below it by itself.`);
        return null;
      }
      const since = temp.filter((r) => r.ts >= stoppedSince);
      // no forecast while rising or flat; a band when the ambient is fitted (shared/cooling/forecast.ts)
      const fc = forecastCooling(since, s.safeOpenTempC, towards);
      if (fc.kind === 'none') {
        reasons.push(fc.text);
        return null;
      }
      if (fc.kind === 'forecast') {
        times.push(fc.at);
        tempBand = { at: fc.at, earliest: fc.earliest, latest: fc.latest, ambientFitted: fc.ambientFitted };
      }
    }
    // Pressure: a first-order decay toward 0 kPa gauge (an empirical fit, not a model of the system), fitted
    // only from where the pressure leaves its plateau after the stop (see pressureFalling).
    if (presMet) times.push(presSince!);
    else {
      const since = pres.filter((r) => r.ts >= stoppedSince);
      const falling = pressureFalling(since);
      const fit =
        s.maxPressureKpa > 0
          ? fitCooling(
              falling.map((r) => ({ t: r.ts / 1000, temp: r.value })),
              0,
            )
          : null;
      const dt = fit ? timeToReachS(lp!.value, 0, fit.tauS, s.maxPressureKpa) : Infinity;
      if (!Number.isFinite(dt)) {
        const held = since.length > 0 && falling.length < 3;
        reasons.push(
          held
            ? `Coolant pressure is not falling yet (still near ${fmt(Math.max(...since.map((r) => r.value)))} kPa since the stop): no forecast until it starts to fall.`
            : 'Coolant pressure is not falling toward zero: no forecast.',
        );
        return null;
      }
      times.push(lp!.ts + dt * 1000);
    }
    const at = Math.max(now, Math.max(...times) + s.holdS * 1000);
    if (tempBand) {
      // the stop and pressure times bound the band from below; the hold comes after every one of them
      const others = times.filter((t) => t !== tempBand!.at);
      const base = others.length ? Math.max(...others) : -Infinity;
      band = {
        earliest: Math.max(now, Math.max(base, tempBand.earliest) + s.holdS * 1000),
        latest: tempBand.latest === null ? null : Math.max(now, Math.max(base, tempBand.latest) + s.holdS * 1000),
        ambientFitted: tempBand.ambientFitted,
      };
    } else band = { earliest: at, latest: at, ambientFitted: false };
    return at;
  }
}

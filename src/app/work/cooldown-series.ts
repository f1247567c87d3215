import { forecastCooling } from '../../../shared/cooling/forecast';
import { coolingTemperature, fitCooling, timeToReachS } from '../../../shared/cooling/newton-cooling';
import { pressureFalling } from '../../../shared/work/opening-check';
import { UnitPreferences, convertStored, unitSymbol } from '../ui/unit-format';

/** One bucket of GET /api/engines/:id/readings, stored (SI) units. */
export interface ReadingBucket {
  t: number;
  mean: number;
  min: number;
  max: number;
  count: number;
}

export interface XY {
  x: number;
  y: number;
}

/** Never more measured points per trace than this, whatever the server sends. */
export const MAX_MEASURED_POINTS = 600;
/** Points of the drawn fitted curve. */
export const CURVE_POINTS = 48;

export interface CooldownTrace {
  /** Unit symbol of every y value (the user's unit). */
  unit: string;
  /** Bucket means since the stop, display units, at most maxPoints. */
  measured: XY[];
  /** The fitted curve, anchored at the newest reading (as the opening check predicts), display units. */
  fitted: XY[];
  /** The limit in display units. */
  limit: number;
  /** ms when the fitted curve reaches the limit (the forecast); null when it does not (see `why`). */
  reachAt: number | null;
  /** The forecast's band when the ambient had to be fitted (latest null: cannot say); null otherwise. */
  band: { earliest: number; latest: number | null } | null;
  /** The newest reading is at or below the limit. */
  met: boolean;
  /** Why there is no crossing, in words; null when there is one or the limit is met. */
  why: string | null;
}

export interface CooldownInput {
  /** ms the engine stopped. */
  stopTs: number;
  temp: readonly ReadingBucket[];
  pressure: readonly ReadingBucket[];
  safeOpenTempC: number;
  maxPressureKpa: number;
  heaterSetpointC: number | null;
  ambientC: number | null;
  prefs: UnitPreferences;
  /** Bound of the measured series (the chart's width in px is a good choice). */
  maxPoints?: number;
}

/** Evenly thinned to at most n points, keeping the newest. */
function bounded<T>(list: readonly T[], n: number): T[] {
  if (list.length <= n) return list.slice();
  const out: T[] = [];
  const step = (list.length - 1) / (n - 1);
  for (let i = 0; i < n; i++) out.push(list[Math.round(i * step)]);
  return out;
}

/**
 * A curve T(t) = Ta + (T_last - Ta) e^(-(t - t_last)/tau) drawn from the first reading to `end`, its last
 * point exactly at `end`: the fitted tau and Ta through the newest reading, which is how the opening check
 * (shared/work/opening-check.ts) projects forward, so the drawn crossing is the check's own.
 */
function curve(fromTs: number, end: number, last: { ts: number; value: number }, ambient: number, tauS: number, conv: (v: number) => number): XY[] {
  const out: XY[] = [];
  if (!(end > fromTs)) return out;
  for (let i = 0; i < CURVE_POINTS; i++) {
    const x = i === CURVE_POINTS - 1 ? end : fromTs + ((end - fromTs) * i) / (CURVE_POINTS - 1);
    out.push({ x, y: conv(coolingTemperature(last.value, ambient, tauS, (x - last.ts) / 1000)) });
  }
  return out;
}

const good = (b: readonly ReadingBucket[], stopTs: number) =>
  b.filter((r) => r.count > 0 && Number.isFinite(r.mean) && r.t >= stopTs).sort((a, b2) => a.t - b2.t);

/** Coolant temperature and pressure since the stop, their fitted cool-down curves and limits, ready to draw. */
export function buildCooldown(input: CooldownInput): { temp: CooldownTrace; pressure: CooldownTrace } {
  const n = Math.max(2, Math.min(MAX_MEASURED_POINTS, Math.floor(input.maxPoints ?? MAX_MEASURED_POINTS)));
  const cT = (v: number) => convertStored(v, 'temperature', input.prefs).value;
  const cP = (v: number) => convertStored(v, 'pressure', input.prefs).value;

  // Temperature: toward the heater setpoint or ambient, whichever is warmer, as the check does.
  const temp = good(input.temp, input.stopTs);
  const tLimit = input.safeOpenTempC;
  const towards = [input.heaterSetpointC, input.ambientC].filter((v): v is number => v !== null && Number.isFinite(v));
  const ta = towards.length ? Math.max(...towards) : null;
  const tTrace: CooldownTrace = {
    unit: unitSymbol('temperature', input.prefs),
    measured: bounded(temp, n).map((b) => ({ x: b.t, y: cT(b.mean) })),
    fitted: [],
    limit: cT(tLimit),
    reachAt: null,
    band: null,
    met: false,
    why: null,
  };
  const tLast = temp.length ? { ts: temp[temp.length - 1].t, value: temp[temp.length - 1].mean } : null;
  tTrace.met = !!tLast && tLast.value <= tLimit;
  // the shared forecast (the opening check uses the same): none while rising or flat, a band when Ta is fitted
  const fc =
    tLast && !tTrace.met
      ? forecastCooling(
          temp.map((b) => ({ ts: b.t, value: b.mean })),
          tLimit,
          ta,
        )
      : null;
  if (tLast && fc?.kind === 'forecast') {
    tTrace.reachAt = fc.at;
    tTrace.fitted = curve(temp[0].t, fc.at, tLast, fc.ambientC, fc.tauS, cT);
    if (fc.ambientFitted) tTrace.band = { earliest: fc.earliest, latest: fc.latest };
  }
  if (!tTrace.met && tTrace.reachAt === null) {
    if (input.heaterSetpointC !== null && input.heaterSetpointC >= tLimit) tTrace.why = 'heater';
    else if (ta !== null && ta >= tLimit) tTrace.why = 'ambient';
    else if (fc?.kind === 'none' && fc.why === 'rising') tTrace.why = 'rising';
    else if (fc?.kind === 'none' && (fc.why === 'flat' || fc.why === 'levels-off')) tTrace.why = 'not falling';
    else tTrace.why = temp.length < 3 ? 'too few readings since the stop' : 'not cooling toward the limit';
  }

  // Pressure: decay toward 0 kPa gauge fitted from where it leaves its plateau, as the check does.
  const pres = good(input.pressure, input.stopTs);
  const pLimit = input.maxPressureKpa;
  const pTrace: CooldownTrace = {
    unit: unitSymbol('pressure', input.prefs),
    measured: bounded(pres, n).map((b) => ({ x: b.t, y: cP(b.mean) })),
    fitted: [],
    limit: cP(pLimit),
    reachAt: null,
    band: null,
    met: false,
    why: null,
  };
  const pLast = pres.length ? { ts: pres[pres.length - 1].t, value: pres[pres.length - 1].mean } : null;
  pTrace.met = !!pLast && pLast.value <= pLimit;
  if (pLast && !pTrace.met) {
    const falling = pressureFalling(pres.map((b) => ({ ts: b.t, value: b.mean })));
    const pFit =
      pLimit > 0
        ? fitCooling(
            falling.map((r) => ({ t: r.ts / 1000, temp: r.value })),
            0,
          )
        : null;
    const dt = pFit ? timeToReachS(pLast.value, 0, pFit.tauS, pLimit) : Infinity;
    if (pFit && Number.isFinite(dt)) {
      pTrace.reachAt = pLast.ts + dt * 1000;
      pTrace.fitted = curve(falling[0].ts, pTrace.reachAt, pLast, 0, pFit.tauS, cP);
    } else {
      pTrace.why = pres.length < 3 ? 'too few readings since the stop' : 'not falling yet';
    }
  }
  return { temp: tTrace, pressure: pTrace };
}

/**
 * When will a stopped engine's coolant be below a limit? One function for the server's opening check
 * and the client's cool-down chart, so both say the same.
 *
 * Newton's law of cooling with a lumped capacitance, T(t) = Ta + (T0 - Ta) e^(-t/tau) (Incropera et al.,
 * Fundamentals of Heat and Mass Transfer, ch. 5), fitted to the readings since the highest point after
 * the stop (after a stop the jacket water can heat-soak upward for minutes before it cools).
 *
 * No forecast while the temperature is rising or flat: a warming or level curve says nothing about when it
 * will be low enough, and an extrapolated "clear soon" would invite opening a hot system. When the ambient
 * is not measured it is fitted too; a fitted ambient is poorly determined over a short span (the forecast
 * tends to come early), so the forecast then carries a band: every ambient whose fit is statistically as
 * good as the best one (profile of the sum of squares, F test at 95 %) gives a crossing time, and the band
 * runs from the earliest to the latest of them (latest null: a plausible fit never gets there).
 */
import { coolingTemperature, fitCooling, type CoolingFit } from './newton-cooling';

export interface TimedSample {
  /** ms since epoch */
  ts: number;
  value: number;
}

export type NoForecastReason = 'too-few' | 'rising' | 'flat' | 'levels-off';

export type CoolingForecast =
  | { kind: 'reached' }
  | { kind: 'none'; why: NoForecastReason; text: string }
  | {
      kind: 'forecast';
      /** ms when the fitted curve reaches the limit. */
      at: number;
      /** The band: equal to `at` when the ambient is measured. */
      earliest: number;
      /** null when a fit as good as the best never reaches the limit. */
      latest: number | null;
      ambientC: number;
      ambientFitted: boolean;
      tauS: number;
    };

/** |t| of the recent slope needed to call the curve falling (about 99 % one-sided for a handful of points). */
const FALLING_T = 3;
/** 2 F(2, n-3) at 95 %: about 6.0 for many points, wider for few (ambient and time constant uncertain together). */
const fCrit = (n: number) => 6.0 + 24 / Math.max(1, n - 3);

function slope(pts: readonly TimedSample[]): { b: number; t: number } {
  const n = pts.length;
  const mt = pts.reduce((s, p) => s + p.ts, 0) / n;
  const my = pts.reduce((s, p) => s + p.value, 0) / n;
  let sxx = 0,
    sxy = 0;
  for (const p of pts) {
    sxx += (p.ts - mt) ** 2;
    sxy += (p.ts - mt) * (p.value - my);
  }
  if (sxx === 0) return { b: 0, t: 0 };
  const b = sxy / sxx;
  let sse = 0;
  for (const p of pts) sse += (p.value - my - b * (p.ts - mt)) ** 2;
  const se = n > 2 ? Math.sqrt(sse / (n - 2) / sxx) : 0;
  return { b, t: se === 0 ? (b === 0 ? 0 : Math.sign(b) * Infinity) : b / se };
}

/** Seconds from T0 down to `limit` on a curve falling toward Ta (< limit); Infinity when it never gets there. */
function secondsDownTo(T0: number, ambientC: number, tauS: number, limit: number): number {
  if (T0 <= limit) return 0;
  if (!(ambientC < limit) || !(tauS > 0)) return Infinity;
  return tauS * Math.log((T0 - ambientC) / (limit - ambientC));
}

const sseOf = (pts: readonly TimedSample[], f: CoolingFit) =>
  pts.reduce((s, p) => s + (p.value - coolingTemperature(f.startC, f.ambientC, f.tauS, p.ts / 1000 - f.t0)) ** 2, 0);

/**
 * Forecast of when `samples` (one channel since the stop) fall to `limit` or below.
 * `ambientC`: the temperature approached when known (measured ambient, or a heater setpoint), else null.
 */
export function forecastCooling(samples: readonly TimedSample[], limit: number, ambientC: number | null): CoolingForecast {
  const pts = samples.filter((p) => Number.isFinite(p.ts) && Number.isFinite(p.value)).sort((a, b) => a.ts - b.ts);
  if (!pts.length) return { kind: 'none', why: 'too-few', text: 'No readings since the stop yet: no forecast.' };
  const last = pts[pts.length - 1];
  if (last.value <= limit) return { kind: 'reached' };
  // from the highest point on: a heat soak before it is not part of the cool-down
  let peak = 0;
  for (let i = 1; i < pts.length; i++) if (pts[i].value > pts[peak].value) peak = i;
  const falling = pts.slice(peak);
  if (falling.length < 3) {
    return pts.length >= 3
      ? { kind: 'none', why: 'rising', text: 'The coolant temperature is rising (heat soak after the stop): no forecast until it falls.' }
      : { kind: 'none', why: 'too-few', text: 'Not enough readings since the stop for a forecast.' };
  }
  // the recent trend decides: the last third of the fall, at least 5 minutes and 3 readings
  const span = last.ts - falling[0].ts;
  const from = last.ts - Math.max(300_000, span / 3);
  let recent = falling.filter((p) => p.ts >= from);
  if (recent.length < 3) recent = falling.slice(-3);
  const trend = slope(recent);
  if (trend.t > FALLING_T) return { kind: 'none', why: 'rising', text: 'The coolant temperature is rising: no forecast until it falls.' };
  if (!(trend.t < -FALLING_T)) return { kind: 'none', why: 'flat', text: 'The coolant temperature is not falling (level, or held by a heater): no forecast.' };

  const asS = falling.map((p) => ({ t: p.ts / 1000, temp: p.value }));
  const best = fitCooling(asS, ambientC);
  if (!best) return { kind: 'none', why: 'flat', text: 'The readings since the stop do not show a cool-down to fit: no forecast.' };
  const dt = secondsDownTo(last.value, best.ambientC, best.tauS, limit);
  if (!Number.isFinite(dt)) {
    return { kind: 'none', why: 'levels-off', text: `The coolant is levelling off near ${best.ambientC.toFixed(1)} °C, above the limit: no forecast.` };
  }
  const at = last.ts + dt * 1000;
  // the fitted curve's own value now, not the last (noisy) reading, anchors the band's crossings
  const fittedNow = (f: CoolingFit) => coolingTemperature(f.startC, f.ambientC, f.tauS, last.ts / 1000 - f.t0);
  if (ambientC !== null) return { kind: 'forecast', at, earliest: at, latest: at, ambientC: best.ambientC, ambientFitted: false, tauS: best.tauS };

  // band over every ambient whose fit is as good as the best one (F test on the sum of squares)
  const n = falling.length;
  const sseBest = sseOf(falling, best);
  const bound = sseBest * (1 + fCrit(n) / Math.max(1, n - 3)) + 1e-9 * n;
  const lo = Math.min(...falling.map((p) => p.value));
  const range = Math.max(1e-6, pts[peak].value - lo);
  let earliest = at,
    latest: number | null = at;
  const dBest = secondsDownTo(fittedNow(best), best.ambientC, best.tauS, limit);
  if (Number.isFinite(dBest)) {
    earliest = Math.min(earliest, last.ts + dBest * 1000);
    latest = Math.max(latest, last.ts + dBest * 1000);
  }
  const N = 400;
  for (let i = 0; i <= N; i++) {
    // ambients from far below up to just under the lowest reading, denser near the data
    const ta = lo - 1e-3 * range - (50 * range * (Math.pow(1.015, N - i) - 1)) / (Math.pow(1.015, N) - 1);
    const f = fitCooling(asS, ta);
    if (!f || sseOf(falling, f) > bound) continue;
    const d = secondsDownTo(fittedNow(f), ta, f.tauS, limit);
    if (!Number.isFinite(d)) {
      latest = null;
      continue;
    }
    const t = last.ts + d * 1000;
    earliest = Math.min(earliest, t);
    if (latest !== null) latest = Math.max(latest, t);
  }
  return { kind: 'forecast', at, earliest, latest, ambientC: best.ambientC, ambientFitted: true, tauS: best.tauS };
}

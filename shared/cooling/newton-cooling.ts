/**
 * Newton's law of cooling with a lumped capacitance: T(t) = Ta + (T0 - Ta) e^(-t/tau),
 * where tau = rho V c / (h A). Valid when the body is close to uniform in temperature
 * (Biot number h Lc / k below about 0.1). A stopped engine's jacket water is far from a
 * textbook sphere, so the fitted tau is an empirical figure of that engine and that day:
 * good for a prediction, not a promise.
 */

export interface CoolingSample {
  /** seconds (any origin) */
  t: number;
  temp: number;
}

export interface CoolingFit {
  tauS: number;
  /** Coefficient of determination of the fitted curve, in temperature (not log) space. */
  r2: number;
  /** The temperature approached: given, or fitted when not given. */
  ambientC: number;
  ambientFitted: boolean;
  /** Fitted temperature at `t0`. */
  startC: number;
  /** Time origin of the fit: the first sample's t. */
  t0: number;
  n: number;
}

/** Temperature after `tS` seconds starting at T0. */
export function coolingTemperature(T0: number, ambientC: number, tauS: number, tS: number): number {
  return ambientC + (T0 - ambientC) * Math.exp(-tS / tauS);
}

/**
 * Seconds until the temperature, moving from T0 toward Ta, crosses `threshold`:
 * tau ln((T0 - Ta)/(Tth - Ta)). 0 when T0 is already on Ta's side of the threshold;
 * Infinity when the threshold is at or beyond Ta (never reached: e.g. a jacket-water heater
 * set above the safe opening temperature keeps the coolant above it until it is switched off).
 */
export function timeToReachS(T0: number, ambientC: number, tauS: number, threshold: number): number {
  if (![T0, ambientC, tauS, threshold].every(Number.isFinite) || tauS <= 0) return NaN;
  const d0 = T0 - ambientC;
  const dth = threshold - ambientC;
  if (d0 === 0) return threshold === T0 ? 0 : Infinity;
  if (d0 > 0 ? T0 <= threshold : T0 >= threshold) return 0;
  if (d0 > 0 ? dth <= 0 : dth >= 0) return Infinity;
  return tauS * Math.log(d0 / dth);
}

/** tau = rho V c / (h A), seconds. */
export function lumpedTimeConstantS(p: { densityKgM3: number; specificHeatJkgK: number; volumeM3: number; areaM2: number; hWm2K: number }): number {
  return (p.densityKgM3 * p.volumeM3 * p.specificHeatJkgK) / (p.hWm2K * p.areaM2);
}

/** Bi = h Lc / k with Lc = V/A; the lumped model holds for Bi < 0.1. */
export function biotNumber(hWm2K: number, characteristicLengthM: number, conductivityWmK: number): number {
  return (hWm2K * characteristicLengthM) / conductivityWmK;
}

/** Weighted log-linear fit for a fixed Ta. Weights (T - Ta)^2 undo the log's stretching of noise near Ta. */
function fitFixedAmbient(samples: readonly CoolingSample[], ambientC: number): CoolingFit | null {
  if (samples.length < 3) return null;
  const t0 = samples[0].t;
  const above = samples.filter((s) => s.temp > ambientC).length;
  const sign = above * 2 >= samples.length ? 1 : -1;
  const pts = samples.filter((s) => sign * (s.temp - ambientC) > 0);
  if (pts.length < 3) return null;
  let sw = 0,
    st = 0,
    sy = 0;
  for (const p of pts) {
    const w = (p.temp - ambientC) ** 2;
    sw += w;
    st += w * (p.t - t0);
    sy += w * Math.log(sign * (p.temp - ambientC));
  }
  const mt = st / sw,
    my = sy / sw;
  let num = 0,
    den = 0;
  for (const p of pts) {
    const w = (p.temp - ambientC) ** 2;
    const dt = p.t - t0 - mt;
    num += w * dt * (Math.log(sign * (p.temp - ambientC)) - my);
    den += w * dt * dt;
  }
  if (den === 0) return null;
  const slope = num / den;
  if (!(slope < 0)) return null; // not approaching Ta
  const tauS = -1 / slope;
  const startC = ambientC + sign * Math.exp(my - slope * mt);
  const mean = samples.reduce((s, p) => s + p.temp, 0) / samples.length;
  let ssRes = 0,
    ssTot = 0;
  for (const p of samples) {
    ssRes += (p.temp - coolingTemperature(startC, ambientC, tauS, p.t - t0)) ** 2;
    ssTot += (p.temp - mean) ** 2;
  }
  return { tauS, r2: ssTot === 0 ? 0 : 1 - ssRes / ssTot, ambientC, ambientFitted: false, startC, t0, n: samples.length };
}

/**
 * Least-squares fit of tau (and of Ta when `ambientC` is null/undefined) to samples of a body
 * cooling (or warming) toward a steady temperature. Returns null when the samples do not show
 * an approach to a steady temperature (fewer than 3 points, flat, or moving away).
 * Fitting Ta needs data well into the curve (a span of at least about one tau); with a short
 * span it is poorly determined and the r2 will not tell you so: prefer a measured ambient.
 */
export function fitCooling(samples: readonly CoolingSample[], ambientC?: number | null): CoolingFit | null {
  const s = [...samples].filter((p) => Number.isFinite(p.t) && Number.isFinite(p.temp)).sort((a, b) => a.t - b.t);
  if (s.length < 3) return null;
  if (ambientC !== undefined && ambientC !== null) return fitFixedAmbient(s, ambientC);
  const temps = s.map((p) => p.temp);
  const lo = Math.min(...temps),
    hi = Math.max(...temps);
  const range = hi - lo;
  if (range === 0) return null;
  const cooling = s[s.length - 1].temp < s[0].temp;
  // Ta lies beyond the data on the side the curve is heading; search that side.
  const near = cooling ? lo - 1e-3 * range : hi + 1e-3 * range;
  const far = cooling ? lo - 50 * range : hi + 50 * range;
  const sse = (ta: number): number => {
    const f = fitFixedAmbient(s, ta);
    if (!f) return Infinity;
    return s.reduce((acc, p) => acc + (p.temp - coolingTemperature(f.startC, ta, f.tauS, p.t - f.t0)) ** 2, 0);
  };
  // Coarse scan (geometric from the data edge outwards) then golden-section refinement.
  const N = 80;
  let best = 0,
    bestV = Infinity;
  const at = (i: number) => near + (far - near) * ((Math.pow(1.08, i) - 1) / (Math.pow(1.08, N) - 1));
  for (let i = 0; i <= N; i++) {
    const v = sse(at(i));
    if (v < bestV) {
      bestV = v;
      best = i;
    }
  }
  let a = at(Math.max(0, best - 1)),
    b = at(Math.min(N, best + 1));
  const g = (Math.sqrt(5) - 1) / 2;
  let c = b - g * (b - a),
    d = a + g * (b - a);
  let fc = sse(c),
    fd = sse(d);
  for (let k = 0; k < 60; k++) {
    if (fc < fd) {
      b = d;
      d = c;
      fd = fc;
      c = b - g * (b - a);
      fc = sse(c);
    } else {
      a = c;
      c = d;
      fc = fd;
      d = a + g * (b - a);
      fd = sse(d);
    }
  }
  const ta = (a + b) / 2;
  const fit = fitFixedAmbient(s, ta);
  return fit ? { ...fit, ambientFitted: true } : null;
}

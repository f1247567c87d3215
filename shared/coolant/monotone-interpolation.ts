/**
 * Shape-preserving piecewise cubic Hermite interpolation (PCHIP): F. N. Fritsch and J. Butland,
 * "A method for constructing local monotone piecewise cubic interpolants", SIAM J. Sci. Stat. Comput. 5 (1984),
 * the same rule as MATLAB's pchip and SciPy's PchipInterpolator. Between table points it never overshoots,
 * so an interpolated freeze point always lies between its two neighbouring table values.
 */
export interface MonotoneCurve {
  readonly xs: readonly number[];
  readonly ys: readonly number[];
  /** Interpolated y at x; x must lie within [xs[0], xs[last]]. */
  at(x: number): number;
}

export function monotoneCurve(xs: readonly number[], ys: readonly number[]): MonotoneCurve {
  const n = xs.length;
  if (n < 2 || ys.length !== n) throw new Error('monotoneCurve: need at least two points and as many ys as xs');
  for (let i = 1; i < n; i++) if (!(xs[i] > xs[i - 1])) throw new Error('monotoneCurve: xs must increase strictly');

  const h: number[] = [];
  const delta: number[] = [];
  for (let i = 0; i < n - 1; i++) {
    h.push(xs[i + 1] - xs[i]);
    delta.push((ys[i + 1] - ys[i]) / h[i]);
  }
  const d: number[] = new Array(n).fill(0);
  if (n === 2) {
    d[0] = d[1] = delta[0];
  } else {
    for (let i = 1; i < n - 1; i++) {
      if (delta[i - 1] * delta[i] > 0) {
        const w1 = 2 * h[i] + h[i - 1];
        const w2 = h[i] + 2 * h[i - 1];
        d[i] = (w1 + w2) / (w1 / delta[i - 1] + w2 / delta[i]);
      }
    }
    d[0] = endSlope(h[0], h[1], delta[0], delta[1]);
    d[n - 1] = endSlope(h[n - 2], h[n - 3], delta[n - 2], delta[n - 3]);
  }

  return {
    xs,
    ys,
    at(x: number): number {
      if (!(x >= xs[0] && x <= xs[n - 1])) throw new RangeError(`x=${x} outside [${xs[0]}, ${xs[n - 1]}]`);
      let i = 0;
      while (i < n - 2 && x > xs[i + 1]) i++;
      const t = (x - xs[i]) / h[i];
      const t2 = t * t;
      const t3 = t2 * t;
      return (2 * t3 - 3 * t2 + 1) * ys[i] + (t3 - 2 * t2 + t) * h[i] * d[i] + (-2 * t3 + 3 * t2) * ys[i + 1] + (t3 - t2) * h[i] * d[i + 1];
    },
  };
}

/** One-sided three-point end slope, kept shape-preserving (the rule of Fritsch and Butland as used by pchip). */
function endSlope(h0: number, h1: number, del0: number, del1: number): number {
  let d = ((2 * h0 + h1) * del0 - h0 * del1) / (h0 + h1);
  if (Math.sign(d) !== Math.sign(del0)) d = 0;
  else if (Math.sign(del0) !== Math.sign(del1) && Math.abs(d) > Math.abs(3 * del0)) d = 3 * del0;
  return d;
}

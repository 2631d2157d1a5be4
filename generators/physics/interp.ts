/**
 * Monotone piecewise cubic Hermite interpolation: F. N. Fritsch and R. E. Carlson, "Monotone
 * Piecewise Cubic Interpolation", SIAM J. Numer. Anal. 17 (1980) 238–246. Tangents start as the
 * mean of the neighbouring secants, are zeroed at local extrema, and are scaled back onto the
 * circle α² + β² ≤ 9 (their sufficient condition) so that monotone data give a monotone curve.
 *
 * Outside the data range the interpolant is CONSTANT (the end value): no extrapolation of
 * measured quantities beyond the measured lines.
 */
import { KilnInputError } from '../errors.ts';
import { log } from '../numeric/index.ts';

export type Interpolator = (x: number) => number;

/** Fritsch–Carlson interpolant through (xs, ys); xs strictly increasing. */
export function monotoneCubic(xs: ArrayLike<number>, ys: ArrayLike<number>, field = 'x'): Interpolator {
  const n = xs.length;
  if (n !== ys.length) throw new KilnInputError('interpolation needs as many values as abscissae', { field, value: `${n} vs ${ys.length}` });
  if (n === 0) throw new KilnInputError('interpolation needs at least one point', { field, value: 0, expected: '≥ 1 point' });
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(xs[i]) || !Number.isFinite(ys[i]))
      throw new KilnInputError('interpolation points must be finite', { field: `${field}[${i}]`, value: `${xs[i]}, ${ys[i]}` });
    if (i > 0 && !(xs[i] > xs[i - 1]))
      throw new KilnInputError('abscissae must be strictly increasing', { field: `${field}[${i}]`, value: xs[i], expected: `> ${xs[i - 1]}` });
  }
  const x = Float64Array.from(xs);
  const y = Float64Array.from(ys);
  if (n === 1) return () => y[0];
  const delta = new Float64Array(n - 1);
  for (let k = 0; k < n - 1; k++) delta[k] = (y[k + 1] - y[k]) / (x[k + 1] - x[k]);
  const m = new Float64Array(n);
  m[0] = delta[0];
  m[n - 1] = delta[n - 2];
  for (let k = 1; k < n - 1; k++) m[k] = delta[k - 1] * delta[k] <= 0 ? 0 : 0.5 * (delta[k - 1] + delta[k]);
  for (let k = 0; k < n - 1; k++) {
    if (delta[k] === 0) {
      m[k] = 0;
      m[k + 1] = 0;
      continue;
    }
    const a = m[k] / delta[k];
    const b = m[k + 1] / delta[k];
    // end tangents of the wrong sign would break monotonicity
    if (a < 0) m[k] = 0;
    if (b < 0) m[k + 1] = 0;
    const s = a * a + b * b;
    if (s > 9) {
      const t = 3 / Math.sqrt(s);
      m[k] = t * a * delta[k];
      m[k + 1] = t * b * delta[k];
    }
  }
  return (xv: number) => {
    if (!(xv > x[0])) return y[0];
    if (xv >= x[n - 1]) return y[n - 1];
    let lo = 0;
    let hi = n - 1;
    while (hi - lo > 1) {
      const mid = (lo + hi) >> 1;
      if (x[mid] <= xv) lo = mid;
      else hi = mid;
    }
    const h = x[hi] - x[lo];
    const t = (xv - x[lo]) / h;
    const t2 = t * t;
    const t3 = t2 * t;
    return (2 * t3 - 3 * t2 + 1) * y[lo] + (t3 - 2 * t2 + t) * h * m[lo] + (-2 * t3 + 3 * t2) * y[hi] + (t3 - t2) * h * m[hi];
  };
}

/** Monotone cubic in ln E of values given at energies (keV); constant outside the range. */
export function logEnergyInterpolator(energiesKeV: ArrayLike<number>, values: ArrayLike<number>, field = 'energyKeV'): Interpolator {
  const lx = new Float64Array(energiesKeV.length);
  for (let i = 0; i < lx.length; i++) {
    if (!(energiesKeV[i] > 0)) throw new KilnInputError('energies must be > 0 for log interpolation', { field: `${field}[${i}]`, value: energiesKeV[i], expected: '> 0 keV' });
    lx[i] = log(energiesKeV[i]);
  }
  const f = monotoneCubic(lx, values, field);
  return (e) => f(log(e));
}

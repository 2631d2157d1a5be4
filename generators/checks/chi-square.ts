/**
 * Upper tail of the χ² distribution with k degrees of freedom, Q(k/2, x/2), for integer k, by the
 * exact recurrence of the regularised incomplete gamma function in steps of one:
 *   Q(a + 1, y) = Q(a, y) + y^a e^{−y} / Γ(a + 1),   Q(1, y) = e^{−y},   Q(½, y) = erfc(√y)
 * (Abramowitz & Stegun 6.5.21 and 26.4.4–26.4.5; from memory, checked against scipy in
 * tests/checks/closure-joint.test.ts). The terms are summed in log space so large x do not overflow.
 * And the standard normal's upper quantile by bisection on erfc (exact to double precision).
 */
import { erfc } from '../physics/special.ts';
import { exp, log } from '../numeric/index.ts';

export function chiSquareSurvival(x: number, dof: number): number {
  if (!(dof >= 1) || !Number.isInteger(dof)) throw new Error(`chiSquareSurvival: dof must be a positive integer, got ${dof}`);
  if (!(x > 0)) return 1;
  const y = x / 2;
  let a: number;
  let q: number;
  let logTerm: number;
  if (dof % 2 === 0) {
    a = 1;
    q = exp(-y);
    logTerm = log(y) - y; // y^1 e^{−y} / Γ(2)
  } else {
    a = 0.5;
    q = erfc(Math.sqrt(y));
    logTerm = 0.5 * log(y) - y - log(Math.sqrt(Math.PI) / 2); // y^½ e^{−y} / Γ(3/2)
  }
  while (a < dof / 2) {
    q += exp(logTerm);
    a += 1;
    logTerm += log(y) - log(a);
  }
  return Math.min(1, q);
}

/** z with P(Z > z) = p for a standard normal Z, 0 < p < 1. */
export function normalUpperQuantile(p: number): number {
  if (!(p > 0 && p < 1)) throw new Error(`normalUpperQuantile: p must be in (0, 1), got ${p}`);
  let lo = -40;
  let hi = 40;
  for (let i = 0; i < 200 && hi - lo > 1e-14; i++) {
    const mid = 0.5 * (lo + hi);
    if (0.5 * erfc(mid / Math.SQRT2) > p) lo = mid;
    else hi = mid;
  }
  return 0.5 * (lo + hi);
}

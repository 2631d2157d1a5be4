/**
 * The weighted least-squares routine (generators/fit/lsq.ts) against outside references:
 * - NIST StRD nonlinear regression, dataset Misra1a (lower difficulty): data, certified parameters,
 *   their standard deviations and the residual sum of squares, all from memory; the values were
 *   re-derived here from the data by Debian's python3-numpy (analytic Jacobian at the certified
 *   point) and by scipy.optimize.least_squares, which agree to every digit written below;
 * - a weighted linear model, whose minimum and covariance are exact solutions of the normal
 *   equations (numpy.linalg.lstsq and inv(AᵀWA) by Debian's python3-numpy as the reference);
 * - exact mathematics for one-parameter cases: a constrained convex quadratic has its minimum at
 *   the bound nearest the unconstrained one; one point of a one-parameter model is fitted exactly,
 *   with variance σ²/(∂f/∂θ)²; Gauss–Newton solves a linear model in one step.
 */
import { describe, expect, it } from 'vitest';
import { execFileSync } from 'node:child_process';
import { chi2Of, weightedLeastSquares, type LsqProblem } from '../../generators/fit/lsq.ts';
import { KilnInputError } from '../../generators/errors.ts';
import { requirePython } from '../support/python.ts';
import { mulberry32 } from './rng.ts';

// NIST StRD, Misra1a: y = b1·(1 − exp(−b2·x)), 14 observations (from memory, see above).
const MISRA_X = [77.6, 114.9, 141.1, 190.8, 239.9, 289.0, 332.8, 378.4, 434.8, 477.3, 536.8, 593.1, 689.1, 760.0];
const MISRA_Y = [10.07, 14.73, 17.94, 23.93, 29.61, 35.18, 40.02, 44.82, 50.76, 55.05, 61.01, 66.4, 75.47, 81.78];
const MISRA_CERTIFIED = { b1: 2.3894212918e2, b2: 5.5015643181e-4, sd1: 2.7070075241, sd2: 7.2668688436e-6, rss: 1.2455138894e-1, residualSd: 1.018787633e-1 };
/** NIST's two starting points. */
const MISRA_STARTS = [
  [500, 1e-4],
  [250, 5e-4],
];

function misra(initial: number[], withJacobian: boolean, scaleByReducedChi2 = true): LsqProblem {
  return {
    names: ['b1', 'b2'],
    x: MISRA_X,
    y: MISRA_Y,
    sigma: MISRA_X.map(() => 1),
    model: ([b1, b2], x) => b1 * (1 - Math.exp(-b2 * x)),
    jacobian: withJacobian ? ([b1, b2], x) => [1 - Math.exp(-b2 * x), b1 * x * Math.exp(-b2 * x)] : undefined,
    initial,
    scaleByReducedChi2,
  };
}

const rel = (a: number, b: number) => Math.abs(a / b - 1);

describe('weighted least squares on NIST StRD Misra1a (certified values)', () => {
  for (const start of MISRA_STARTS)
    for (const withJacobian of [false, true])
      it(`reaches the certified minimum from NIST start (${start}) with ${withJacobian ? 'an analytic' : 'a finite-difference'} Jacobian`, () => {
        const r = weightedLeastSquares(misra(start, withJacobian));
        const c = MISRA_CERTIFIED;
        // χ² is flat at the minimum: a relative parameter error δ moves it by only (δ·b/σ)², so
        // parameters agree to ~1e-8 where χ² agrees to 1e-9
        expect(rel(r.params.b1, c.b1)).toBeLessThan(2e-8);
        expect(rel(r.params.b2, c.b2)).toBeLessThan(2e-8);
        expect(rel(r.chi2, c.rss)).toBeLessThan(1e-9);
        expect(r.dof).toBe(12);
        expect(rel(r.reducedChi2 as number, c.residualSd ** 2)).toBeLessThan(1e-9);
        // NIST's standard deviations are those of (JᵀJ)⁻¹·RSS/dof
        expect(r.errorsScaledByReducedChi2).toBe(true);
        expect(rel(r.errors.b1, c.sd1)).toBeLessThan(1e-6);
        expect(rel(r.errors.b2, c.sd2)).toBeLessThan(1e-6);
        expect(rel(r.covariance[0][0], c.sd1 ** 2)).toBeLessThan(2e-6);
        expect(r.covariance[0][1]).toBe(r.covariance[1][0]);
        expect(r.free).toEqual(['b1', 'b2']);
        expect(r.fixed).toEqual([]);
      });

  it('unscaled (the default) gives (JᵀJ)⁻¹ itself: the certified deviations over the residual standard deviation', () => {
    const r = weightedLeastSquares(misra(MISRA_STARTS[0], true, false));
    const c = MISRA_CERTIFIED;
    expect(r.errorsScaledByReducedChi2).toBe(false);
    expect(rel(r.errors.b1, c.sd1 / c.residualSd)).toBeLessThan(1e-6);
    expect(rel(r.errors.b2, c.sd2 / c.residualSd)).toBeLessThan(1e-6);
  });

  it('holds a fixed parameter: b2 at its certified value leaves b1 alone free, at its certified value', () => {
    const r = weightedLeastSquares({ ...misra([100, MISRA_CERTIFIED.b2], false, false), fixed: [false, true] });
    expect(r.fixed).toEqual(['b2']);
    expect(r.free).toEqual(['b1']);
    expect(r.params.b2).toBe(MISRA_CERTIFIED.b2);
    expect(r.errors.b2).toBe(0);
    // b1 enters linearly: its minimum is Σ y·u / Σ u² with u = 1 − exp(−b2·x) (normal equation)
    const u = MISRA_X.map((x) => 1 - Math.exp(-MISRA_CERTIFIED.b2 * x));
    const b1 = u.reduce((s, ui, i) => s + ui * MISRA_Y[i], 0) / u.reduce((s, ui) => s + ui * ui, 0);
    expect(rel(r.params.b1, b1)).toBeLessThan(1e-10);
    expect(r.dof).toBe(13);
    expect(r.covariance.length).toBe(1);
    expect(rel(r.covariance[0][0], 1 / u.reduce((s, ui) => s + ui * ui, 0))).toBeLessThan(1e-8);
  });
});

describe('weighted least squares on a linear model (normal equations, numpy as reference)', () => {
  // y = θ0 + θ1·x + θ2·x², seeded noise and unequal errors; no Jacobian, scale, min or max given
  const rnd = mulberry32(1515);
  const X = Array.from({ length: 15 }, (_, i) => 0.5 + i * 0.7);
  const SIG = X.map(() => 0.2 + rnd());
  const Y = X.map((x, i) => 1.5 - 0.8 * x + 0.09 * x * x + SIG[i] * (rnd() - 0.5) * 2);

  let cached: { theta: number[]; cov: number[][]; chi2: number } | undefined;
  function numpyReference(): { theta: number[]; cov: number[][]; chi2: number } {
    if (cached) return cached;
    const py = requirePython('scipy');
    const script = `
import sys, json, numpy as np
d = json.load(sys.stdin)
x, y, s = (np.array(d[k]) for k in ("x", "y", "s"))
A = np.stack([np.ones_like(x), x, x * x], 1)
theta = np.linalg.lstsq(A / s[:, None], y / s, rcond=None)[0]
cov = np.linalg.inv((A / s[:, None]).T @ (A / s[:, None]))
chi2 = float(np.sum(((y - A @ theta) / s) ** 2))
print(json.dumps({"theta": theta.tolist(), "cov": cov.tolist(), "chi2": chi2}))`;
    cached = JSON.parse(execFileSync(py, ['-c', script], { input: JSON.stringify({ x: X, y: Y, s: SIG }) }).toString());
    return cached as { theta: number[]; cov: number[][]; chi2: number };
  }

  it('gives the solution of the normal equations, (AᵀWA)⁻¹ as covariance and χ² with dof = n − 3', () => {
    const ref = numpyReference();
    const r = weightedLeastSquares({ names: ['c0', 'c1', 'c2'], x: X, y: Y, sigma: SIG, model: ([a, b, c], x) => a + b * x + c * x * x, initial: [0, 0, 0] });
    ['c0', 'c1', 'c2'].forEach((k, i) => expect(Math.abs(r.params[k] - ref.theta[i]), k).toBeLessThan(1e-9 * (1 + Math.abs(ref.theta[i]))));
    for (let a = 0; a < 3; a++) for (let b = 0; b < 3; b++) expect(rel(r.covariance[a][b], ref.cov[a][b]), `cov[${a}][${b}]`).toBeLessThan(1e-6);
    ['c0', 'c1', 'c2'].forEach((k, i) => expect(rel(r.errors[k], Math.sqrt(ref.cov[i][i])), k).toBeLessThan(1e-6));
    expect(rel(r.chi2, ref.chi2)).toBeLessThan(1e-10);
    expect(r.dof).toBe(12);
    expect(r.reducedChi2).toBe(r.chi2 / 12);
    expect(r.errorsScaledByReducedChi2).toBe(false);
    expect(chi2Of({ names: [], x: X, y: Y, sigma: SIG, model: ([a, b, c], x) => a + b * x + c * x * x, initial: [] }, ref.theta)).toBeCloseTo(ref.chi2, 10);
  });

  it('scaled by χ²/dof on request: covariance × reducedChi2', () => {
    const ref = numpyReference();
    const r = weightedLeastSquares({ names: ['c0', 'c1', 'c2'], x: X, y: Y, sigma: SIG, model: ([a, b, c], x) => a + b * x + c * x * x, initial: [1, 1, 1], scaleByReducedChi2: true });
    const f = ref.chi2 / 12;
    for (let a = 0; a < 3; a++) for (let b = 0; b < 3; b++) expect(rel(r.covariance[a][b], ref.cov[a][b] * f), `cov[${a}][${b}]`).toBeLessThan(1e-6);
  });
});

describe('weighted least squares, exact one-parameter cases', () => {
  // y = a·x: χ²(a) = Σ (y − a x)²/σ² is a convex quadratic with minimum a* = Σ(xy/σ²)/Σ(x²/σ²)
  const X = [1, 2, 3, 4];
  const Y = [2.1, 3.9, 6.2, 7.8];
  const S = [0.1, 0.2, 0.2, 0.4];
  const aStar = X.reduce((s, x, i) => s + (x * Y[i]) / S[i] ** 2, 0) / X.reduce((s, x, i) => s + (x * x) / S[i] ** 2, 0);
  const line = (o: Partial<LsqProblem>): LsqProblem => ({ names: ['a'], x: X, y: Y, sigma: S, model: ([a], x) => a * x, initial: [1], ...o });

  it('unbounded: the normal-equation minimum, variance 1/Σ(x²/σ²)', () => {
    const r = weightedLeastSquares(line({}));
    // χ² in doubles is flat within its rounding ε·χ²: a is resolved to σ_a·√(ε·χ²) ≈ 1e-9 relative
    expect(rel(r.params.a, aStar)).toBeLessThan(1e-9);
    expect(rel(r.covariance[0][0], 1 / X.reduce((s, x, i) => s + (x * x) / S[i] ** 2, 0))).toBeLessThan(1e-8);
  });

  it('bounded: the minimum sits on the bound nearest the unconstrained one, from either side', () => {
    const hi = weightedLeastSquares(line({ max: [aStar - 0.25] }));
    expect(hi.params.a).toBe(aStar - 0.25);
    const lo = weightedLeastSquares(line({ min: [aStar + 0.25], initial: [3] }));
    expect(lo.params.a).toBe(aStar + 0.25);
    // a start outside the box is brought to the bound the minimum lies on
    const from = weightedLeastSquares(line({ max: [aStar - 0.25], initial: [aStar + 3] }));
    expect(from.params.a).toBe(aStar - 0.25);
    // a bound the minimum lies within changes nothing
    const inside = weightedLeastSquares(line({ min: [aStar - 1], max: [aStar + 1] }));
    expect(rel(inside.params.a, aStar)).toBeLessThan(1e-9);
  });

  it('one point (below the LM package’s two): the Gauss–Newton steps alone fit it exactly, with variance σ²/(∂f/∂a)²', () => {
    // y = exp(a·x) through (2, 5): a = ln(5)/2 ≈ 0.805; ∂f/∂a = x·e^(a x) = 2·5. The start is near
    // the solution: undamped steps from far away overshoot, and the first rejected step ends the polish.
    const p: LsqProblem = { names: ['a'], x: [2], y: [5], sigma: [0.5], model: ([a], x) => Math.exp(a * x), initial: [0.75] };
    for (const scaleByReducedChi2 of [false, true]) {
      const r = weightedLeastSquares({ ...p, scaleByReducedChi2 });
      expect(rel(r.params.a, Math.log(5) / 2)).toBeLessThan(1e-12);
      expect(r.iterations).toBeGreaterThan(1);
      expect(r.dof).toBe(0);
      expect(r.reducedChi2).toBeNull();
      expect(r.errorsScaledByReducedChi2).toBe(false);
      expect(rel(r.errors.a, 0.5 / 10)).toBeLessThan(1e-8);
    }
  });

  it('two points, two parameters (the fewest the LM package takes): the curve through both, from a far start', () => {
    // b1·(1 − e^(−b2·x)) through two points of b = (2, 0.7): χ² = 0 there, and the parameters are that b
    const f = ([b1, b2]: readonly number[], x: number) => b1 * (1 - Math.exp(-b2 * x));
    // errors of any size leave an exact fit where it is
    for (const sigma of [[1, 1], [0.5, 2]]) {
      const r = weightedLeastSquares({ names: ['b1', 'b2'], x: [1, 3], y: [f([2, 0.7], 1), f([2, 0.7], 3)], sigma, model: f, initial: [1, 0.1] });
      expect(rel(r.params.b1, 2), `σ = ${sigma}`).toBeLessThan(1e-9);
      expect(rel(r.params.b2, 0.7), `σ = ${sigma}`).toBeLessThan(1e-9);
      expect(r.chi2).toBeLessThan(1e-20);
    }
  });

  it('Gauss–Newton solves a linear model in one step: iterations count the accepted steps', () => {
    // y = a·x through (2, 3) with the exact Jacobian: a = 1.5 after one step, and no further step lowers χ² = 0
    const r = weightedLeastSquares({ names: ['a'], x: [2], y: [3], sigma: [1], model: ([a], x) => a * x, jacobian: (_, x) => [x], initial: [1] });
    expect(r.params.a).toBe(1.5);
    expect(r.chi2).toBe(0);
    expect(r.iterations).toBe(1);
  });

  it('accepts only steps that lower χ²: a first step that overshoots leaves the start, and χ² is that of the returned parameters', () => {
    // y = exp(a·x) through (2, 5) from a = 0.3: the undamped step goes to a ≈ 1.17, where χ² is larger
    const p: LsqProblem = { names: ['a'], x: [2], y: [5], sigma: [0.5], model: ([a], x) => Math.exp(a * x), jacobian: ([a], x) => [x * Math.exp(a * x)], initial: [0.3] };
    const r = weightedLeastSquares(p);
    expect(r.params.a).toBe(0.3);
    expect(r.iterations).toBe(0);
    expect(r.chi2).toBe(chi2Of(p, [0.3]));
  });

  it('Gauss–Newton on f(a) = a² towards 0 halves a exactly each step; it stops when χ² falls by less than 1e-13, or after 30 steps', () => {
    // the step is −f/f′ = −a/2 (exact in binary); χ² = a⁴ falls by 15/16 of itself per step, below
    // 1e-13 once χ² ≤ 2⁻⁴⁴: from a = 1 that is the 12th step (a = 2⁻¹²)
    const p = (a0: number): LsqProblem => ({ names: ['a'], x: [0], y: [0], sigma: [1], model: ([a]) => a * a, jacobian: ([a]) => [2 * a], initial: [a0] });
    const one = weightedLeastSquares(p(1));
    expect(one.params.a).toBe(2 ** -12);
    expect(one.iterations).toBe(12);
    expect(one.chi2).toBe(2 ** -48);
    // from a = 2²⁰ the step cap (30, the code's stated limit) ends it at a = 2⁻¹⁰
    const far = weightedLeastSquares(p(2 ** 20));
    expect(far.params.a).toBe(2 ** -10);
    expect(far.iterations).toBe(30);
  });

  it('with every parameter fixed: the initial values, χ² there, zero errors, dof = n', () => {
    const r = weightedLeastSquares(line({ fixed: [true], initial: [2] }));
    expect(r.params.a).toBe(2);
    expect(r.errors.a).toBe(0);
    expect(r.covariance).toEqual([]);
    expect(r.iterations).toBe(0);
    expect(r.chi2).toBeCloseTo(X.reduce((s, x, i) => s + ((Y[i] - 2 * x) / S[i]) ** 2, 0), 12);
    expect(r.dof).toBe(4);
    expect(r.free).toEqual([]);
    expect(r.fixed).toEqual(['a']);
  });
});

describe('weighted least squares, bad input (one-line errors: file, field, value, expected)', () => {
  const base: LsqProblem = { names: ['a', 'b'], x: [1, 2, 3], y: [1, 2, 3], sigma: [1, 1, 1], model: ([a, b], x) => a + b * x, initial: [0, 1], label: 'test law', file: 'lines.csv' };
  const error = (p: LsqProblem): KilnInputError => {
    try {
      weightedLeastSquares(p);
    } catch (e) {
      if (e instanceof KilnInputError) return e;
      throw e;
    }
    throw new Error('no error');
  };

  it('fewer points than free parameters; exactly as many is a fit', () => {
    const e = error({ ...base, x: [1], y: [1], sigma: [1] });
    expect(e.oneLine()).toBe('lines.csv: lines: test law: fewer data points than free parameters (got 1; expected ≥ 2 (free: a, b))');
    const exact = weightedLeastSquares({ ...base, x: [1, 3], y: [2, 5], sigma: [1, 1] });
    expect(rel(exact.params.b, 1.5)).toBeLessThan(1e-12);
    expect(rel(exact.params.a, 0.5)).toBeLessThan(1e-12);
    expect(exact.dof).toBe(0);
    expect(error({ ...base, label: undefined, x: [1], y: [1], sigma: [1], fixed: [false, false] }).message).toBe('fit: fewer data points than free parameters');
  });

  it('a point without a finite value or a positive error, named by its 1-based number', () => {
    for (const [y, sigma, shown] of [
      [2, 0, '2 ± 0'],
      [2, -1, '2 ± -1'],
      [2, NaN, '2 ± NaN'],
      [NaN, 1, 'NaN ± 1'],
      [Infinity, 1, 'Infinity ± 1'],
    ] as const) {
      const e = error({ ...base, y: [1, y, 3], sigma: [1, sigma, 1] });
      expect(e.oneLine()).toBe(`lines.csv: point 2: test law: every point needs a finite value and an error > 0 (got "${shown}"; expected error > 0)`);
    }
  });

  it('parameters the data cannot separate are reported as degenerate', () => {
    const e = error({ ...base, model: ([a, b]) => a + b });
    expect(e.message).toBe('test law: parameters are not constrained by the data (degenerate); fix one of them');
    expect(e.where).toMatchObject({ file: 'lines.csv', field: 'free', value: 'a, b' });
    expect(e.where.expected).toMatch(/^parameters the lines can separate/);
  });
});

/**
 * Weighted least squares: minimise χ² = Σ ((y − f(x; θ))/σ)² with the Levenberg–Marquardt
 * routine of the ml-levenberg-marquardt package, then a short Gauss–Newton polish to settle the
 * optimum, then the covariance (JᵀWJ)⁻¹ from the Jacobian at the optimum (W = diag 1/σ²).
 *
 * The covariance is NOT scaled by χ²/dof by default: the inputs carry measured 1σ errors, so
 * (JᵀWJ)⁻¹ is the covariance they imply; with the handful of lines a calibration has, χ²/dof itself
 * scatters widely (relative σ ≈ √(2/dof)), and scaling would hide a model that does not fit.
 * χ²/dof is reported so a poor fit is visible; `scaleByReducedChi2` is for data with relative
 * errors only.
 *
 * Internally the LM iterates on normalised residuals (y_i/σ_i against f/σ_i) with unit weights and
 * on parameters divided by their typical scale, so its damping (added to JᵀJ as λI) is balanced.
 */
import { levenbergMarquardt } from 'ml-levenberg-marquardt';
import { KilnInputError } from '../errors.ts';
import { cholesky, choleskySolve, spdInverse } from './linalg.ts';

export interface LsqProblem {
  names: readonly string[];
  x: ArrayLike<number>;
  y: ArrayLike<number>;
  sigma: ArrayLike<number>;
  model: (theta: readonly number[], x: number) => number;
  /** ∂f/∂θ for all parameters; central differences when absent. */
  jacobian?: (theta: readonly number[], x: number) => number[];
  initial: readonly number[];
  /** true for parameters held at their initial value. */
  fixed?: readonly boolean[];
  min?: readonly number[];
  max?: readonly number[];
  /** Typical magnitude of each parameter (step scale). */
  scale?: readonly number[];
  scaleByReducedChi2?: boolean;
  /** Label used in error messages (e.g. "FWHM law"). */
  label?: string;
  file?: string;
}

/** Plain JSON-able fit result. Errors of fixed parameters are 0; covariance is over `free`, in that order. */
export interface FitResult {
  params: Record<string, number>;
  errors: Record<string, number>;
  free: string[];
  fixed: string[];
  covariance: number[][];
  chi2: number;
  dof: number;
  reducedChi2: number | null;
  errorsScaledByReducedChi2: boolean;
  /** Levenberg–Marquardt iterations (none below two points, which the package refuses) plus accepted Gauss–Newton steps. */
  iterations: number;
}

/** The package has no step-size stopping rule (it stops only at χ² ≤ errorTolerance), so it runs all its iterations; the Gauss–Newton polish settles the optimum. */
const LM_MAX_ITERATIONS = 100;
/** Gauss–Newton steps at most; the polish stops earlier when a step no longer lowers χ² by 1e-13·max(1, χ²). */
const POLISH_ITERATIONS = 30;

export function chi2Of(p: LsqProblem, theta: readonly number[]): number {
  let s = 0;
  for (let i = 0; i < p.x.length; i++) {
    const r = (p.y[i] - p.model(theta, p.x[i])) / p.sigma[i];
    s += r * r;
  }
  return s;
}

function jacobianRow(p: LsqProblem, theta: readonly number[], x: number, scale: readonly number[]): number[] {
  if (p.jacobian) return p.jacobian(theta, x);
  return theta.map((t, k) => {
    const h = 1e-6 * Math.max(Math.abs(t), scale[k]);
    const up = theta.slice();
    const dn = theta.slice();
    up[k] = t + h;
    dn[k] = t - h;
    return (p.model(up, x) - p.model(dn, x)) / (2 * h);
  });
}

/** JᵀWJ over the free parameters (its lower triangle: all that cholesky reads), and JᵀW r. */
function normalEquations(p: LsqProblem, theta: readonly number[], freeIdx: readonly number[], scale: readonly number[]) {
  const m = freeIdx.length;
  const a = Array.from({ length: m }, () => new Array<number>(m).fill(0));
  const g = new Array<number>(m).fill(0);
  for (let i = 0; i < p.x.length; i++) {
    const w = 1 / (p.sigma[i] * p.sigma[i]);
    const jr = jacobianRow(p, theta, p.x[i], scale);
    const r = p.y[i] - p.model(theta, p.x[i]);
    for (let a1 = 0; a1 < m; a1++) {
      const ja = jr[freeIdx[a1]];
      g[a1] += w * ja * r;
      for (let b1 = 0; b1 <= a1; b1++) a[a1][b1] += w * ja * jr[freeIdx[b1]];
    }
  }
  return { a, g };
}

export function weightedLeastSquares(p: LsqProblem): FitResult {
  const nPar = p.names.length;
  const n = p.x.length;
  const label = p.label ?? 'fit';
  // Stryker disable next-line ArrayDeclaration: an empty array reads undefined at every index, which the free/fixed filters treat as false, the same as the filled array.
  const fixed = p.fixed ?? new Array<boolean>(nPar).fill(false);
  const freeIdx = [...Array(nPar).keys()].filter((k) => !fixed[k]);
  // A start at 0 says nothing of the magnitude: 1 then, not a tiny floor that would make the
  // central-difference step vanish against the other terms of the model.
  const scale = p.scale ?? p.initial.map((v) => Math.abs(v) || 1);
  const min = p.min ?? new Array<number>(nPar).fill(-Infinity);
  const max = p.max ?? new Array<number>(nPar).fill(Infinity);
  if (n < freeIdx.length)
    throw new KilnInputError(`${label}: fewer data points than free parameters`, { file: p.file, field: 'lines', value: n, expected: `≥ ${freeIdx.length} (free: ${freeIdx.map((k) => p.names[k]).join(', ')})` });
  for (let i = 0; i < n; i++)
    if (!(p.sigma[i] > 0) || !Number.isFinite(p.y[i]))
      throw new KilnInputError(`${label}: every point needs a finite value and an error > 0`, { file: p.file, field: `point ${i + 1}`, value: `${p.y[i]} ± ${p.sigma[i]}`, expected: 'error > 0' });

  const full = (q: ArrayLike<number>): number[] => {
    const t = p.initial.slice();
    freeIdx.forEach((k, j) => (t[k] = q[j] * scale[k]));
    return t;
  };
  // Stryker disable next-line MethodExpression: theta is only ever replaced by new arrays (full(...), next), never written in place, so an alias of p.initial changes nothing.
  let theta = p.initial.slice();
  let iterations = 0;
  if (freeIdx.length > 0 && n >= 2) {
    const idx = Float64Array.from({ length: n }, (_, i) => i);
    const yn = Float64Array.from({ length: n }, (_, i) => p.y[i] / p.sigma[i]);
    const lm = levenbergMarquardt(
      { x: idx, y: yn },
      (q) => {
        const t = full(q);
        return (i) => p.model(t, p.x[i]) / p.sigma[i];
      },
      {
        initialValues: freeIdx.map((k) => p.initial[k] / scale[k]),
        minValues: freeIdx.map((k) => min[k] / scale[k]),
        maxValues: freeIdx.map((k) => max[k] / scale[k]),
        maxIterations: LM_MAX_ITERATIONS,
        errorTolerance: 1e-12,
        jacobianFunction: (q) => {
          const t = full(q);
          return (i) => {
            const jr = jacobianRow(p, t, p.x[i], scale);
            return freeIdx.map((k) => (jr[k] * scale[k]) / p.sigma[i]);
          };
        },
      },
    );
    theta = full(lm.parameterValues);
    iterations = lm.iterations;
  }

  // Gauss–Newton polish within the bounds: accept only steps that lower χ²
  let chi2 = chi2Of(p, theta);
  // (with no free parameter the normal matrix is 0 × 0, the step empty, and the first pass ends the loop)
  for (let it = 0; it < POLISH_ITERATIONS; it++) {
    const { a, g } = normalEquations(p, theta, freeIdx, scale);
    const l = cholesky(a);
    if (!l) break;
    const d = choleskySolve(l, g);
    const next = theta.slice();
    freeIdx.forEach((k, j) => (next[k] = Math.min(max[k], Math.max(min[k], theta[k] + d[j]))));
    const c2 = chi2Of(p, next);
    if (!(c2 < chi2)) break;
    const rel = chi2 - c2;
    theta = next;
    chi2 = c2;
    iterations++;
    if (rel < 1e-13 * Math.max(1, chi2)) break;
  }

  const { a } = normalEquations(p, theta, freeIdx, scale);
  const cov = spdInverse(a); // the empty matrix when nothing is free
  if (!cov)
    throw new KilnInputError(`${label}: parameters are not constrained by the data (degenerate); fix one of them`, {
      file: p.file,
      field: 'free',
      value: freeIdx.map((k) => p.names[k]).join(', '),
      expected: 'parameters the lines can separate (e.g. fix sigma0Ev when pixels per event do not vary with energy)',
    });
  const dof = n - freeIdx.length;
  const reduced = dof > 0 ? chi2 / dof : null;
  const scaleBy = p.scaleByReducedChi2 === true && reduced !== null;
  const f = scaleBy ? (reduced as number) : 1;
  const covariance = cov.map((r) => r.map((v) => v * f));
  const params: Record<string, number> = {};
  const errors: Record<string, number> = {};
  p.names.forEach((name, k) => {
    params[name] = theta[k];
    const j = freeIdx.indexOf(k);
    errors[name] = j >= 0 ? Math.sqrt(covariance[j][j]) : 0;
  });
  return {
    params,
    errors,
    free: freeIdx.map((k) => p.names[k]),
    fixed: p.names.filter((_, k) => fixed[k]),
    covariance,
    chi2,
    dof,
    reducedChi2: reduced,
    errorsScaledByReducedChi2: scaleBy,
    iterations,
  };
}

/**
 * Forward-folding fit of a source model to a spectrum by minimising the C-statistic.
 *
 * The minimiser is the Levenberg–Marquardt routine of the ml-levenberg-marquardt package run on
 * the deviance residuals r_i = sign(m_i − d_i)√(C_i): Σ r_i² = C, so its least-squares optimum is
 * the C minimum. Parameters are scaled by their curvature error estimate so the routine's additive
 * damping is balanced; it is run in short rounds until C stops falling (the package itself only
 * stops at a target value). Errors: the 1σ interval of each free parameter is where the profile
 * C (the others re-fitted) rises by 1 above the minimum (Cash 1979), found by secant steps on √ΔC.
 */
import { levenbergMarquardt } from 'ml-levenberg-marquardt';
import { KilnInputError } from '../errors.ts';
import { spdInverse } from '../fit/linalg.ts';
import { cstat, devianceResidual, goodness, MODEL_FLOOR_COUNTS, type Goodness } from './cstat.ts';
import { foldCounts } from './fold.ts';
import { binnedPhotonFlux, type FluxGrid } from './flux.ts';
import { modelParameters, withParameters, type SourceModel } from './model.ts';
import type { FoldingResponse } from './response.ts';

/** Rounds of the package's routine, iterations per round, and the C change that ends the fit. */
const MAX_ROUNDS = 40;
const ITERATIONS_PER_ROUND = 2;
const C_CONVERGED = 1e-7;
/** Largest projected gradient of C/2 in error-scaled units at a converged optimum (≈ that many σ from it). */
const GRADIENT_CONVERGED = 1e-3;
/** Rounds in a row without a lower C after which the fit stops. */
const STALLED_ROUNDS = 3;
/** Damping of the first round, in error-scaled units (where JᵀJ ≈ 1): nearly Gauss–Newton. */
const INITIAL_DAMPING = 1e-2;
/** Forward-difference step of the Jacobian: this fraction of a parameter's curvature error, or of its value before that is known. */
const JACOBIAN_STEP_SIGMA = 1e-3;
const JACOBIAN_STEP = 1e-5;
/** ΔC of a 1σ interval for one parameter of interest (Cash 1979). */
export const DELTA_C_1SIGMA = 1;
/** The profile ends when ΔC is within this of its target; at most this many steps per side. */
const PROFILE_TOLERANCE = 2e-3;
const PROFILE_MAX_STEPS = 12;

export interface FitSpec {
  model: SourceModel;
  /** Names of the free parameters; every other parameter is held at its value in `model`. */
  free: readonly string[];
  /** Tighter bounds than the physical ones, per parameter. */
  bounds?: Readonly<Record<string, readonly [number, number]>>;
}

export interface FitData {
  response: FoldingResponse;
  grid: FluxGrid;
  /** Counts per channel (0-based channel index). */
  counts: Float64Array;
  exposureS: number;
  /** Channel indices used (all when absent). */
  channels?: Int32Array;
}

export interface FitOptions {
  /** Profile the 1σ errors (default true). */
  errors?: boolean;
  onProgress?: (line: string) => void;
}

export interface FittedParameter {
  name: string;
  value: number;
  unit: string;
  free: boolean;
  min: number;
  max: number;
  /** Curvature (Fisher) 1σ error at the optimum; 0 for fixed parameters. */
  errorCurvature: number;
  /** Profile ΔC = 1 distances below and above the value (null when not profiled). */
  errorLow: number | null;
  errorHigh: number | null;
  /** The interval reached a bound before ΔC = 1 on that side. */
  lowAtBound: boolean;
  highAtBound: boolean;
}

export interface SpectrumFit {
  converged: boolean;
  cstat: number;
  channels: number;
  dof: number;
  goodness: Goodness;
  iterations: number;
  evaluations: number;
  parameters: FittedParameter[];
  model: SourceModel;
  /** Expected counts of the best fit per channel. */
  expected: Float64Array;
}

interface Problem {
  data: FitData;
  base: SourceModel;
  names: string[];
  min: number[];
  max: number[];
  channels: Int32Array;
  evaluations: number;
  flux: Float64Array;
  counts: Float64Array;
}

function modelCounts(p: Problem, names: readonly string[], theta: readonly number[], out: Float64Array): Float64Array {
  p.evaluations++;
  const values: Record<string, number> = {};
  names.forEach((n, k) => (values[n] = theta[k]));
  const m = withParameters(p.base, values);
  binnedPhotonFlux(p.data.grid, m, p.flux);
  return foldCounts(p.data.response, p.flux, p.data.exposureS, out);
}

interface SubResult {
  theta: number[];
  c: number;
  iterations: number;
  converged: boolean;
  /** Jᵀ J of the deviance residuals at the optimum, in parameter units (½ Hessian of C). */
  fisher: number[][];
}

/**
 * Minimises C over the parameters `idx` (indices into p.names), the others held at `fixedTheta`.
 */
function minimise(p: Problem, theta0: readonly number[], idx: readonly number[]): SubResult {
  const all = theta0.slice();
  const nFree = idx.length;
  const d = p.data.counts;
  const ch = p.channels;
  const m0 = new Float64Array(p.data.response.detchans);
  const mj = new Float64Array(p.data.response.detchans);
  const set = (q: ArrayLike<number>, scale: number[], centre: number[]) => {
    const t = all.slice();
    idx.forEach((k, j) => (t[k] = centre[j] + q[j] * scale[j]));
    return t;
  };
  /** J (channels × free) of the deviance residuals with respect to θ, forward differences. */
  const jacobian = (t: number[], steps: number[]): { r: Float64Array; jac: Float64Array[] } => {
    modelCounts(p, p.names, t, m0);
    const r = new Float64Array(ch.length);
    const drdm = new Float64Array(ch.length);
    for (let i = 0; i < ch.length; i++) {
      const m = Math.max(m0[ch[i]], MODEL_FLOOR_COUNTS);
      const di = d[ch[i]];
      r[i] = devianceResidual(m, di);
      // dr/dm = (1 − d/m)/r, → 1/√m where m = d.
      drdm[i] = Math.abs(r[i]) > 1e-9 ? (1 - di / m) / r[i] : 1 / Math.sqrt(m);
    }
    const jac = idx.map((k, j) => {
      let h = steps[j];
      if (t[k] + h > p.max[k]) h = -h;
      const tt = t.slice();
      tt[k] += h;
      modelCounts(p, p.names, tt, mj);
      const col = new Float64Array(ch.length);
      for (let i = 0; i < ch.length; i++) col[i] = (drdm[i] * (mj[ch[i]] - m0[ch[i]])) / h;
      return col;
    });
    return { r, jac };
  };
  const fisherOf = (jac: Float64Array[]) => jac.map((a) => jac.map((b) => { let s = 0; for (let i = 0; i < a.length; i++) s += a[i] * b[i]; return s; }));
  const gradOf = (jac: Float64Array[], r: Float64Array) => jac.map((a) => { let s = 0; for (let i = 0; i < a.length; i++) s += a[i] * r[i]; return s; });

  let theta = all.slice();
  let c = Infinity;
  let iterations = 0;
  let converged = nFree === 0;
  let fisher: number[][] | null = null;
  const stepsFor = (t: number[]) =>
    idx.map((k, j) => {
      const f = fisher?.[j][j] ?? 0;
      return f > 0 ? JACOBIAN_STEP_SIGMA / Math.sqrt(f) : JACOBIAN_STEP * Math.max(Math.abs(t[k]), Math.abs(p.max[k] - p.min[k]) < Infinity ? Math.abs(p.max[k] - p.min[k]) * 1e-3 : 1);
    });
  let J = jacobian(theta, stepsFor(theta));
  fisher = fisherOf(J.jac);
  let stalled = 0;
  c = J.r.reduce((s, x) => s + x * x, 0);
  let damping = INITIAL_DAMPING;
  for (let round = 0; round < MAX_ROUNDS && nFree > 0; round++) {
    // Scale each free parameter by its curvature error: the routine then works in units of σ.
    const fi = fisher;
    const scale = idx.map((k, j) => {
      const s = fi[j][j] > 0 ? 1 / Math.sqrt(fi[j][j]) : Math.max(Math.abs(theta[k]), 1);
      return Number.isFinite(s) && s > 0 ? s : 1;
    });
    const centre = idx.map((k) => theta[k]);
    const cache = new Map<string, Float64Array>();
    const residualsAt = (q: ArrayLike<number>): Float64Array => {
      const key = Array.from(q).join(',');
      let r = cache.get(key);
      if (r) return r;
      modelCounts(p, p.names, set(q, scale, centre), m0);
      r = new Float64Array(ch.length);
      for (let i = 0; i < ch.length; i++) r[i] = devianceResidual(m0[ch[i]], d[ch[i]]);
      if (cache.size > 8) cache.clear();
      cache.set(key, r);
      return r;
    };
    const lm = levenbergMarquardt(
      { x: Float64Array.from({ length: ch.length }, (_, i) => i), y: new Float64Array(ch.length) },
      (q) => {
        const r = residualsAt(q);
        return (i) => r[i];
      },
      {
        initialValues: new Array<number>(nFree).fill(0),
        minValues: idx.map((k, j) => (p.min[k] - centre[j]) / scale[j]),
        maxValues: idx.map((k, j) => (p.max[k] - centre[j]) / scale[j]),
        damping,
        maxIterations: ITERATIONS_PER_ROUND,
        errorTolerance: 0,
        jacobianFunction: (q) => {
          const t = set(q, scale, centre);
          const { jac } = jacobian(t, scale.map((s) => s * JACOBIAN_STEP * 100));
          return (i) => jac.map((col, j) => col[i] * scale[j]);
        },
      },
    );
    iterations += lm.iterations;
    const next = set(lm.parameterValues, scale, centre);
    J = jacobian(next, stepsFor(next));
    const cNext = J.r.reduce((s, x) => s + x * x, 0);
    const improved = cNext < c;
    if (improved) {
      theta = next;
      fisher = fisherOf(J.jac);
    } else {
      J = jacobian(theta, stepsFor(theta));
    }
    const change = c - Math.min(c, cNext);
    c = Math.min(c, cNext);
    damping = improved ? 1e-3 : Math.min(damping * 10 + 1, 1e6);
    // Projected gradient of C/2 in σ units: components pushing against an active bound do not count.
    const g = gradOf(J.jac, J.r);
    let gmax = 0;
    idx.forEach((k, j) => {
      const sj = fi[j][j] > 0 ? 1 / Math.sqrt(fi[j][j]) : 1;
      const gj = g[j] * sj;
      const atMin = theta[k] <= p.min[k] && gj > 0;
      const atMax = theta[k] >= p.max[k] && gj < 0;
      if (!atMin && !atMax) gmax = Math.max(gmax, Math.abs(gj));
    });
    stalled = improved ? 0 : stalled + 1;
    // Converged when the gradient says the optimum is within GRADIENT_CONVERGED σ, or C no longer moves and nearly so.
    if (gmax < GRADIENT_CONVERGED || (change < C_CONVERGED && gmax < 10 * GRADIENT_CONVERGED)) {
      converged = true;
      break;
    }
    if (stalled >= STALLED_ROUNDS) break;
  }
  return { theta, c, iterations, converged, fisher: fisher ?? [] };
}

function buildProblem(data: FitData, spec: FitSpec): Problem {
  const params = modelParameters(spec.model);
  const known = new Set(params.map((x) => x.name));
  for (const f of spec.free)
    if (!known.has(f)) throw new KilnInputError(`unknown free parameter "${f}"`, { field: 'free', value: f, expected: `one of ${[...known].join(', ')}` });
  const min = params.map((x) => Math.max(x.min, spec.bounds?.[x.name]?.[0] ?? -Infinity));
  const max = params.map((x) => Math.min(x.max, spec.bounds?.[x.name]?.[1] ?? Infinity));
  params.forEach((x, k) => {
    if (!(x.value >= min[k] && x.value <= max[k]))
      throw new KilnInputError(`starting value of ${x.name} is outside its bounds`, { field: x.name, value: x.value, expected: `${min[k]} to ${max[k]}` });
  });
  const n = data.response.detchans;
  if (data.counts.length !== n)
    throw new KilnInputError('spectrum and response have different channel counts', { field: 'DETCHANS', value: data.counts.length, expected: `${n} channels, as in the RMF` });
  const channels = data.channels ?? Int32Array.from({ length: n }, (_, i) => i);
  return {
    data,
    base: spec.model,
    names: params.map((x) => x.name),
    min,
    max,
    channels,
    evaluations: 0,
    flux: new Float64Array(data.grid.loKeV.length),
    counts: new Float64Array(n),
  };
}

/** Profile distance from the optimum to ΔC = 1 on one side of parameter k. */
function profileSide(p: Problem, best: SubResult, k: number, freeIdx: number[], cov: number[][], start: number, sign: 1 | -1): { dist: number; atBound: boolean } {
  const others = freeIdx.filter((x) => x !== k);
  const bound = sign > 0 ? p.max[k] : p.min[k];
  const room = Math.abs(bound - best.theta[k]);
  const jk = freeIdx.indexOf(k);
  const deltaAt = (dist: number): number => {
    const t = best.theta.slice();
    t[k] = best.theta[k] + sign * dist;
    // Start the others where the quadratic approximation puts their conditional optimum.
    freeIdx.forEach((x, j) => {
      if (x !== k) t[x] = Math.min(p.max[x], Math.max(p.min[x], best.theta[x] + (cov[j][jk] / cov[jk][jk]) * sign * dist));
    });
    return Math.max(0, minimise(p, t, others).c - best.c);
  };
  // Secant steps on g(δ) = √ΔC − 1, which is nearly linear in δ (exactly so for a quadratic C).
  let d0 = 0;
  let g0 = -1;
  let d1 = Math.min(start, room);
  let g1 = Math.sqrt(deltaAt(d1)) - 1;
  for (let it = 0; it < PROFILE_MAX_STEPS && Math.abs(g1) > PROFILE_TOLERANCE / 2; it++) {
    if (d1 >= room && g1 < 0) return { dist: room, atBound: true };
    const slope = (g1 - g0) / (d1 - d0);
    let d2 = slope > 0 ? d1 - g1 / slope : d1 * 2;
    if (!(d2 > 0)) d2 = d1 / 2;
    d2 = Math.min(d2, room);
    d0 = d1;
    g0 = g1;
    d1 = d2;
    g1 = Math.sqrt(deltaAt(d1)) - 1;
  }
  return { dist: d1, atBound: d1 >= room && g1 < 0 };
}

export function fitSpectrum(data: FitData, spec: FitSpec, opts: FitOptions = {}): SpectrumFit {
  const p = buildProblem(data, spec);
  const progress = opts.onProgress ?? (() => {});
  const params = modelParameters(spec.model);
  const theta0 = params.map((x) => x.value);
  const freeIdx = spec.free.map((f) => p.names.indexOf(f));
  const best = minimise(p, theta0, freeIdx);
  progress(`best fit: C = ${best.c.toFixed(3)} after ${best.iterations} iterations`);
  const cov = freeIdx.length ? spdInverse(best.fisher) : [];
  let converged = best.converged && cov !== null;
  const curv = freeIdx.map((_, j) => (cov ? Math.sqrt(Math.max(0, cov[j][j])) : NaN));
  const prof = new Map<number, { low: { dist: number; atBound: boolean }; high: { dist: number; atBound: boolean } }>();
  if (opts.errors !== false && converged) {
    freeIdx.forEach((k, j) => {
      progress(`errors: ${p.names[k]} (${j + 1}/${freeIdx.length})`);
      const start = Number.isFinite(curv[j]) && curv[j] > 0 ? curv[j] : Math.abs(best.theta[k]) * 0.1 || 1;
      prof.set(k, { low: profileSide(p, best, k, freeIdx, cov!, start, -1), high: profileSide(p, best, k, freeIdx, cov!, start, 1) });
    });
  }
  const expected = modelCounts(p, p.names, best.theta, new Float64Array(data.response.detchans));
  const values: Record<string, number> = {};
  p.names.forEach((n, k) => (values[n] = best.theta[k]));
  const parameters: FittedParameter[] = params.map((x, k) => {
    const j = freeIdx.indexOf(k);
    const pr = prof.get(k);
    return {
      name: x.name,
      value: best.theta[k],
      unit: x.unit,
      free: j >= 0,
      min: p.min[k],
      max: p.max[k],
      errorCurvature: j >= 0 ? curv[j] : 0,
      errorLow: pr ? pr.low.dist : null,
      errorHigh: pr ? pr.high.dist : null,
      lowAtBound: pr ? pr.low.atBound : false,
      highAtBound: pr ? pr.high.atBound : false,
    };
  });
  if (!Number.isFinite(best.c)) converged = false;
  return {
    converged,
    cstat: cstat(expected, data.counts, p.channels),
    channels: p.channels.length,
    dof: p.channels.length - freeIdx.length,
    goodness: goodness(expected, data.counts, p.channels),
    iterations: best.iterations,
    evaluations: p.evaluations,
    parameters,
    model: withParameters(spec.model, values),
    expected,
  };
}

/** The symmetric 1σ error of a fitted parameter: the mean of the profile distances, else the curvature error. */
export function symmetricError(x: FittedParameter): number {
  return x.errorLow !== null && x.errorHigh !== null ? 0.5 * (x.errorLow + x.errorHigh) : x.errorCurvature;
}

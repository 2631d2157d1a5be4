import { chi2Of, type LsqProblem } from '../../generators/fit/lsq.ts';
import { spdInverse } from '../../generators/fit/linalg.ts';

/** 2·H⁻¹ with H the Hessian of χ² by central finite differences over the listed parameters (independent of JᵀWJ). */
export function finiteDifferenceCovariance(p: LsqProblem, theta: number[], freeIdx: number[], steps: number[]): number[][] {
  const m = freeIdx.length;
  const f = (d: number[]) => {
    const t = theta.slice();
    freeIdx.forEach((k, j) => (t[k] += d[j]));
    return chi2Of(p, t);
  };
  const h = Array.from({ length: m }, () => new Array<number>(m).fill(0));
  for (let a = 0; a < m; a++)
    for (let b = 0; b < m; b++) {
      const e = (i: number, s: number) => Array.from({ length: m }, (_, k) => (k === i ? s * steps[i] : 0));
      const add = (x: number[], y: number[]) => x.map((v, k) => v + y[k]);
      h[a][b] =
        (f(add(e(a, 1), e(b, 1))) - f(add(e(a, 1), e(b, -1))) - f(add(e(a, -1), e(b, 1))) + f(add(e(a, -1), e(b, -1)))) /
        (4 * steps[a] * steps[b]);
    }
  const inv = spdInverse(h);
  if (!inv) throw new Error('finite-difference Hessian not positive definite');
  return inv.map((r) => r.map((v) => 2 * v));
}

export function meanStd(xs: number[]): { mean: number; std: number } {
  const mean = xs.reduce((a, b) => a + b, 0) / xs.length;
  const std = Math.sqrt(xs.reduce((a, b) => a + (b - mean) ** 2, 0) / (xs.length - 1));
  return { mean, std };
}

/**
 * Average of a function over each energy bin, with its discontinuities resolved: every bin is cut
 * at the breakpoints that fall inside it (absorption edges, table knots) and each piece is
 * integrated with 6-point Gauss–Legendre quadrature, so a bin containing an edge is averaged over
 * both sides instead of being sampled at its centre. A flat spectrum inside each bin is assumed,
 * as the redistribution matrix assumes (generators/response/redistribution.ts).
 */

/** 6-point Gauss–Legendre nodes and weights on [−1, 1] (Abramowitz & Stegun, Table 25.4). */
const GL6_NODES = [-0.932469514203152, -0.661209386466265, -0.238619186083197, 0.238619186083197, 0.661209386466265, 0.932469514203152];
const GL6_WEIGHTS = [0.171324492379170, 0.360761573048139, 0.467913934572691, 0.467913934572691, 0.360761573048139, 0.171324492379170];

export interface BinQuadrature {
  /** Quadrature energies, keV, bin after bin. */
  energiesKeV: Float64Array;
  /** Weight of each node as a share of its bin's width (the weights of one bin sum to 1). */
  weights: Float64Array;
  /** Nodes of bin i are [start[i], start[i + 1]). */
  start: Int32Array;
}

/** Quadrature nodes for the bins [lo[i], hi[i]], pieces cut at the sorted breakpoints inside each bin. */
export function binQuadrature(loKeV: ArrayLike<number>, hiKeV: ArrayLike<number>, breakpointsKeV: readonly number[]): BinQuadrature {
  const cuts = [...breakpointsKeV].filter(Number.isFinite).sort((a, b) => a - b);
  const e: number[] = [];
  const w: number[] = [];
  const start = new Int32Array(loKeV.length + 1);
  let k = 0;
  for (let i = 0; i < loKeV.length; i++) {
    start[i] = e.length;
    const lo = loKeV[i];
    const hi = hiKeV[i];
    while (k < cuts.length && cuts[k] <= lo) k++;
    const pieces = [lo];
    for (let j = k; j < cuts.length && cuts[j] < hi; j++) pieces.push(cuts[j]);
    pieces.push(hi);
    const width = hi - lo;
    for (let p = 0; p + 1 < pieces.length; p++) {
      const half = 0.5 * (pieces[p + 1] - pieces[p]);
      const mid = 0.5 * (pieces[p + 1] + pieces[p]);
      for (let g = 0; g < GL6_NODES.length; g++) {
        e.push(mid + half * GL6_NODES[g]);
        w.push((half * GL6_WEIGHTS[g]) / width);
      }
    }
  }
  start[loKeV.length] = e.length;
  return { energiesKeV: Float64Array.from(e), weights: Float64Array.from(w), start };
}

/** Bin averages of values given at the quadrature's nodes. */
export function binAverages(q: BinQuadrature, valuesAtNodes: ArrayLike<number>): Float64Array {
  const n = q.start.length - 1;
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let s = 0;
    for (let j = q.start[i]; j < q.start[i + 1]; j++) s += q.weights[j] * valuesAtNodes[j];
    out[i] = s;
  }
  return out;
}

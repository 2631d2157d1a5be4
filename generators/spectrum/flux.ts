/**
 * Photon flux of a source model integrated over each energy bin of a response, photons cm⁻² s⁻¹
 * per bin. Continua times the absorption are integrated with 4-point Gauss–Legendre quadrature
 * on each bin, split at every absorption edge of the gas inside it (the integrand jumps there);
 * lines are integrated in closed form (erf) and absorbed with the transmission at the line energy.
 */
import { KilnInputError } from '../errors.ts';
import { TABLE_ENERGY_MAX_KEV, TABLE_ENERGY_MIN_KEV } from '../physics/elements.ts';
import { absorptionEdgesKeV, crossSectionPerHCm2 } from './absorption.ts';
import { continuumDensity, lineFluxInBin } from './components.ts';
import type { AbundanceTable } from './data/abundances.ts';
import type { SourceModel } from './model.ts';
import { exp } from '../numeric/index.ts';

/** 4-point Gauss–Legendre nodes and weights on [−1, 1] (Abramowitz & Stegun 1964, Table 25.4). */
const GL_X = [-0.8611363115940526, -0.3399810435848563, 0.3399810435848563, 0.8611363115940526];
const GL_W = [0.3478548451374538, 0.6521451548625461, 0.6521451548625461, 0.3478548451374538];

export interface FluxGrid {
  loKeV: Float64Array;
  hiKeV: Float64Array;
  abundances: AbundanceTable;
  /** Quadrature nodes of bin i: nodeStart[i]..nodeStart[i+1]. */
  nodeStart: Int32Array;
  nodeKeV: Float64Array;
  /** Weights including the half-width of each sub-interval (Σ over a bin = its width). */
  nodeWeightKeV: Float64Array;
  /** Cross section per H atom at each node, cm² (absorption needs the grid inside the cross-section table). */
  nodeSigmaCm2: Float64Array | null;
}

export function fluxGrid(loKeV: Float64Array, hiKeV: Float64Array, abundances: AbundanceTable): FluxGrid {
  const inTable = loKeV[0] >= TABLE_ENERGY_MIN_KEV && hiKeV[hiKeV.length - 1] <= TABLE_ENERGY_MAX_KEV;
  const edges = absorptionEdgesKeV(abundances);
  const e: number[] = [];
  const w: number[] = [];
  const start = new Int32Array(loKeV.length + 1);
  let k = 0;
  for (let i = 0; i < loKeV.length; i++) {
    start[i] = e.length;
    const cuts = [loKeV[i]];
    while (k < edges.length && edges[k] <= loKeV[i]) k++;
    for (let j = k; j < edges.length && edges[j] < hiKeV[i]; j++) cuts.push(edges[j]);
    cuts.push(hiKeV[i]);
    for (let s = 0; s + 1 < cuts.length; s++) {
      const mid = 0.5 * (cuts[s] + cuts[s + 1]);
      const half = 0.5 * (cuts[s + 1] - cuts[s]);
      for (let q = 0; q < GL_X.length; q++) {
        e.push(mid + half * GL_X[q]);
        w.push(half * GL_W[q]);
      }
    }
  }
  start[loKeV.length] = e.length;
  const nodeKeV = Float64Array.from(e);
  return {
    loKeV,
    hiKeV,
    abundances,
    nodeStart: start,
    nodeKeV,
    nodeWeightKeV: Float64Array.from(w),
    nodeSigmaCm2: inTable ? Float64Array.from(nodeKeV, (x) => crossSectionPerHCm2(x, abundances)) : null,
  };
}

/** Photons cm⁻² s⁻¹ in each bin of the grid. */
export function binnedPhotonFlux(g: FluxGrid, m: SourceModel, out: Float64Array = new Float64Array(g.loKeV.length)): Float64Array {
  const n = g.loKeV.length;
  const absorbed = m.columnCm2 > 0;
  if (absorbed && !g.nodeSigmaCm2)
    throw new KilnInputError('absorption needs the response energy grid inside the cross-section table', {
      field: 'absorption.columnCm2',
      value: `${g.loKeV[0]}–${g.hiKeV[n - 1]} keV`,
      expected: `an energy grid within ${TABLE_ENERGY_MIN_KEV}–${TABLE_ENERGY_MAX_KEV} keV, or columnCm2: 0`,
    });
  out.fill(0);
  const sigma = g.nodeSigmaCm2;
  for (const c of m.components) {
    if (c.kind === 'gaussian-line') {
      const t = absorbed ? exp(-m.columnCm2 * crossSectionPerHCm2(Math.min(Math.max(c.energyKeV, TABLE_ENERGY_MIN_KEV), TABLE_ENERGY_MAX_KEV), m.abundances)) : 1;
      for (let i = 0; i < n; i++) out[i] += t * lineFluxInBin(c, g.loKeV[i], g.hiKeV[i]);
      continue;
    }
    for (let i = 0; i < n; i++) {
      let s = 0;
      for (let q = g.nodeStart[i]; q < g.nodeStart[i + 1]; q++) {
        const t = absorbed ? exp(-m.columnCm2 * sigma![q]) : 1;
        s += g.nodeWeightKeV[q] * t * continuumDensity(c, g.nodeKeV[q]);
      }
      out[i] += s;
    }
  }
  return out;
}

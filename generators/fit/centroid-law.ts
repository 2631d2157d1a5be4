/**
 * Fit of the energy-scale law to measured centroids:
 *   centroid(E) − E = gainError·E + offsetEv − chargeLossEv·exp(−E/chargeLossScaleKeV)   (eV)
 * Any parameter may be held fixed. The charge-loss scale is undetermined when chargeLossEv is 0:
 * fix it in that case (a degenerate fit is reported as an input error).
 */
import type { CentroidLaw, LineFit } from '../response/model-types.ts';
import { weightedLeastSquares, type FitResult } from './lsq.ts';
import { exp } from '../numeric/index.ts';

export const CENTROID_LAW_PARAMS = ['gainError', 'offsetEv', 'chargeLossEv', 'chargeLossScaleKeV'] as const;
export type CentroidLawParam = (typeof CENTROID_LAW_PARAMS)[number];

export interface CentroidFitOptions {
  initial?: Partial<Record<CentroidLawParam, number>>;
  /** Parameters to fit; default all four. */
  free?: readonly CentroidLawParam[];
  scaleByReducedChi2?: boolean;
  file?: string;
}

export function centroidShiftEv(theta: readonly number[], energyKeV: number): number {
  const [g, off, cl, s] = theta;
  return g * energyKeV * 1000 + off - cl * exp(-energyKeV / s);
}

export function fitCentroidLaw(lines: readonly LineFit[], o: CentroidFitOptions = {}): FitResult {
  const init = { gainError: 0, offsetEv: 0, chargeLossEv: 10, chargeLossScaleKeV: 0.5, ...o.initial };
  const free = new Set(o.free ?? CENTROID_LAW_PARAMS);
  return weightedLeastSquares({
    label: 'centroid law',
    file: o.file,
    names: CENTROID_LAW_PARAMS,
    x: lines.map((l) => l.energyKeV),
    y: lines.map((l) => (l.centroidKeV - l.energyKeV) * 1000),
    sigma: lines.map((l) => l.centroidErrEv),
    initial: CENTROID_LAW_PARAMS.map((k) => init[k]),
    fixed: CENTROID_LAW_PARAMS.map((k) => !free.has(k)),
    min: [-0.5, -1e4, -1e4, 1e-3],
    max: [0.5, 1e4, 1e4, 100],
    scale: [1e-3, Math.max(1, Math.abs(init.offsetEv)), Math.max(1, Math.abs(init.chargeLossEv)), Math.max(0.1, init.chargeLossScaleKeV)],
    scaleByReducedChi2: o.scaleByReducedChi2,
    model: centroidShiftEv,
    jacobian: (t, e) => {
      const [, , cl, s] = t;
      const x = exp(-e / s);
      return [e * 1000, 1, -x, (-cl * x * e) / (s * s)];
    },
  });
}

export function toCentroidLaw(r: FitResult): CentroidLaw {
  const p = r.params;
  return { source: 'law', gainError: p.gainError, offsetEv: p.offsetEv, chargeLossEv: p.chargeLossEv, chargeLossScaleKeV: p.chargeLossScaleKeV };
}

/**
 * Physics closure: does the matrix Kiln generated reproduce the measurements it was built from?
 *  - line closure: the Gaussian core refitted to the RMF near a calibration line vs that line's
 *    fitted centroid and FWHM;
 *  - efficiency closure: the response folded at the line energy vs the measured efficiency.
 * Pure functions; the build calls them per detector and epoch.
 */
import type { LineFit } from '../response/model-types.ts';
import type { ArfData, RmfData } from '../response/types.ts';
import { fitCoreAt, FWHM_PER_SIGMA } from './gaussian-core.ts';
import { arfAt, bracket, lerpAt } from './interpolate.ts';
import { fmt, makeCheck } from './make-check.ts';
import { rowSums } from './numbers-rmf.ts';
import { DEFAULT_CLOSURE_TOLERANCES, type ClosureTolerances } from './tolerances.ts';
import type { Check } from './types.ts';

const EV_PER_KEV = 1000;

export type LineMeasurement = Pick<LineFit, 'line' | 'energyKeV' | 'centroidKeV' | 'centroidErrEv' | 'fwhmEv' | 'fwhmErrEv'> &
  Partial<Pick<LineFit, 'efficiency' | 'efficiencyErr'>>;

/** "Mn Kα" → "mn-ka": stable id fragment from a line label. */
export function slug(label: string): string {
  return label
    .normalize('NFKD')
    .replace(/α/g, 'a')
    .replace(/β/g, 'b')
    .replace(/[^\x20-\x7e]/g, '')
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, '-')
    .replace(/^-|-$/g, '');
}

/**
 * σ of a closure residual: the measurement's σ and a systematic part of floor/3 in quadrature
 * (the floor is the refit's own accuracy, stated as a 3σ bound in tolerances.ts).
 */
export function closureSigma(sigma: number | null | undefined, floor: number): number {
  const m = typeof sigma === 'number' && Number.isFinite(sigma) ? Math.abs(sigma) : 0;
  return Math.sqrt(m * m + (floor / 3) * (floor / 3));
}

/** Allowed deviation: k·σ_total (k = 3 reproduces the floor alone when the measurement's σ is 0). */
function allowed(sigma: number | null | undefined, k: number, floor: number): number {
  return k * closureSigma(sigma, floor);
}

export interface LineClosureOptions {
  /**
   * The matrix rows average the profile over each energy bin (Kiln's builder does whenever the
   * line moves by more than σ/4 across a bin; otherwise the widening is below 0.3 %). Default:
   * rows evaluated at the bin centre.
   */
  binAveraged?: boolean;
}

/** Two checks: "closure.centroid.<line>" and "closure.fwhm.<line>". */
export function checkLineClosure(
  rmf: RmfData,
  line: LineMeasurement,
  product: string | null,
  tol: ClosureTolerances = DEFAULT_CLOSURE_TOLERANCES,
  opts: LineClosureOptions = {},
): Check[] {
  const s = slug(line.line);
  const core = fitCoreAt(rmf, line.energyKeV, { side: 'upper' });
  if (!core) {
    const msg = `no Gaussian core could be fitted near ${fmt(line.energyKeV)} keV (fewer than 3 channels above the core threshold)`;
    return [
      makeCheck('fail', { id: `closure.centroid.${s}`, title: `centroid closure at ${line.line}`, product, message: msg }),
      makeCheck('fail', { id: `closure.fwhm.${s}`, title: `FWHM closure at ${line.line}`, product, message: msg }),
    ];
  }
  const dCentroidEv = (core.centroidKeV - line.centroidKeV) * EV_PER_KEV;
  const cTol = allowed(line.centroidErrEv, tol.centroidSigma, tol.centroidFloorEv);
  // A bin-averaged row is the response to a spectrum flat across its energy bin: the bin width adds
  // Δ²/12 to the variance of a monochromatic line's core (the same uniform-average rule as Sheppard's).
  const br = bracket(rmf.energLoKeV, rmf.energHiKeV, line.energyKeV);
  const binEv = opts.binAveraged ? (rmf.energHiKeV[br.i0] - rmf.energLoKeV[br.i0]) * EV_PER_KEV : 0;
  const expectedFwhmEv = Math.sqrt(line.fwhmEv * line.fwhmEv + (FWHM_PER_SIGMA * binEv * (FWHM_PER_SIGMA * binEv)) / 12);
  const dFwhmEv = core.fwhmEv - expectedFwhmEv;
  const fTol = allowed(line.fwhmErrEv, tol.fwhmSigma, tol.fwhmFloorEv);
  return [
    makeCheck(Math.abs(dCentroidEv) <= cTol ? 'pass' : 'fail', {
      id: `closure.centroid.${s}`,
      title: `centroid closure at ${line.line} (${fmt(line.energyKeV)} keV)`,
      product,
      measured: dCentroidEv,
      tolerance: cTol,
      unit: 'eV',
      message: `matrix core at ${fmt(core.centroidKeV)} keV vs line fit ${fmt(line.centroidKeV)} keV (Δ ${fmt(dCentroidEv)} eV, allowed ±${fmt(cTol)})`,
    }),
    makeCheck(Math.abs(dFwhmEv) <= fTol ? 'pass' : 'fail', {
      id: `closure.fwhm.${s}`,
      title: `FWHM closure at ${line.line} (${fmt(line.energyKeV)} keV)`,
      product,
      measured: dFwhmEv,
      tolerance: fTol,
      unit: 'eV',
      message: `matrix core FWHM ${fmt(core.fwhmEv)} eV vs line fit ${fmt(line.fwhmEv)} eV${binEv ? ` widened by the ${fmt(binEv)} eV energy bin to ${fmt(expectedFwhmEv)} eV` : ""} (Δ ${fmt(dFwhmEv)} eV, allowed ±${fmt(fTol)})`,
    }),
  ];
}

export interface FoldOptions {
  /** Multiply by the ARF at the energy, divided by `referenceAreaCm2` (e.g. the mirror area) to stay a fraction. */
  arf?: ArfData;
  referenceAreaCm2?: number;
}

/**
 * Fraction of photons of one energy that the response records in some channel: the row sum
 * (interpolated between row centres) times, optionally, ARF(E)/reference area.
 */
export function foldedLineEfficiency(rmf: RmfData, energyKeV: number, opts: FoldOptions = {}): number {
  const sums = rowSums(rmf);
  let eff = lerpAt(sums, bracket(rmf.energLoKeV, rmf.energHiKeV, energyKeV));
  if (opts.arf) {
    const ref = opts.referenceAreaCm2 ?? 1;
    eff *= arfAt(opts.arf, energyKeV) / ref;
  }
  return eff;
}

/** "closure.efficiency.<line>": model efficiency vs measured, within k·σ (floor). Null measurement → no check. */
export function checkEfficiencyClosure(
  modelEfficiency: number,
  line: Pick<LineMeasurement, 'line' | 'energyKeV' | 'efficiency' | 'efficiencyErr'>,
  product: string | null,
  tol: ClosureTolerances = DEFAULT_CLOSURE_TOLERANCES,
): Check | null {
  if (line.efficiency === null || line.efficiency === undefined) return null;
  const d = modelEfficiency - line.efficiency;
  const t = allowed(line.efficiencyErr ?? 0, tol.efficiencySigma, tol.efficiencyFloor);
  return makeCheck(Number.isFinite(d) && Math.abs(d) <= t ? 'pass' : 'fail', {
    id: `closure.efficiency.${slug(line.line)}`,
    title: `efficiency closure at ${line.line} (${fmt(line.energyKeV)} keV)`,
    product,
    measured: d,
    tolerance: t,
    unit: 'fraction',
    message: `folded response ${fmt(modelEfficiency)} vs measured ${fmt(line.efficiency)} (Δ ${fmt(d)}, allowed ±${fmt(t)})`,
  });
}

/**
 * What a change of response does to a measurement. For a reference source: simulate its spectrum
 * with the newer response (fixed seed), fit it with the newer and with the older response, and
 * report each free parameter's shift (older − newer fit) in physical units and in units of its
 * statistical error, and each band's predicted rate ratio newer/older. Also the predicted rates
 * and pile-up of a source through one response. Pure and deterministic: same inputs, same numbers.
 */
import { KilnInputError } from '../errors.ts';
import { ABUNDANCE_TABLES } from './data/abundances.ts';
import type { Component } from './components.ts';
import { fitSpectrum, symmetricError } from './fit.ts';
import { bandRates, foldCounts, sum, type Band, type BandRate } from './fold.ts';
import { binnedPhotonFlux, fluxGrid, type FluxGrid } from './flux.ts';
import { modelParameters, type SourceModel } from './model.ts';
import { pileupEstimate, type PileupEstimate } from './pileup.ts';
import { poissonDraws } from './random.ts';
import type { FoldingResponse } from './response.ts';

/** A simulated observation has at least this many counts (about 0.3 % Poisson error on the total): exposure is raised to reach it. */
export const IMPACT_MIN_COUNTS = 1e5;

/** A reference source as the build publishes it (JSON-able). */
export interface ReferenceSource {
  id: string;
  title: string;
  exposureS: number;
  seed: number;
  columnCm2: number;
  /** Name of the abundance table (data/abundances.ts). */
  abundances: string;
  components: Component[];
  free: string[];
  bounds: Record<string, [number, number]>;
}

export interface ImpactTolerance {
  shiftSigma: number;
  rateRatio: number;
}

export interface PileupInputsDoc {
  frameTimeS: number;
  brightestCellFraction: number;
}

export function modelOf(s: ReferenceSource): SourceModel {
  const table = ABUNDANCE_TABLES.find((t) => t.name === s.abundances);
  if (!table) throw new KilnInputError('unknown abundance table', { field: `${s.id}.abundances`, value: s.abundances, expected: ABUNDANCE_TABLES.map((t) => t.name).join(', ') });
  return { columnCm2: s.columnCm2, abundances: table, components: s.components.map((c) => ({ ...c })) };
}

export interface Prediction {
  source: string;
  exposureS: number;
  totalCounts: number;
  rateCps: number;
  bands: BandRate[];
  pileup: PileupEstimate;
}

function gridOf(r: FoldingResponse, m: SourceModel): FluxGrid {
  return fluxGrid(r.energLoKeV, r.energHiKeV, m.abundances);
}

export function predict(r: FoldingResponse, s: ReferenceSource, bands: readonly Band[], pileup: PileupInputsDoc): Prediction {
  const m = modelOf(s);
  const counts = foldCounts(r, binnedPhotonFlux(gridOf(r, m), m), s.exposureS);
  const total = sum(counts);
  return {
    source: s.id,
    exposureS: s.exposureS,
    totalCounts: total,
    rateCps: total / s.exposureS,
    bands: bandRates(r, counts, s.exposureS, bands),
    pileup: pileupEstimate({ rateCps: total / s.exposureS, frameTimeS: pileup.frameTimeS, brightestCellFraction: pileup.brightestCellFraction }),
  };
}

export interface ParameterShift {
  name: string;
  unit: string;
  truth: number;
  newer: number;
  /** 1σ statistical error of the newer fit (mean of the ΔC = 1 profile distances). */
  newerError: number;
  older: number;
  /** older − newer, physical units. */
  shift: number;
  /** shift / newerError. */
  shiftSigma: number;
  review: boolean;
}

export interface BandRatio {
  name: string;
  loKeV: number;
  hiKeV: number;
  newerRateCps: number;
  olderRateCps: number;
  /** newer / older (null when the older rate is 0). */
  ratio: number | null;
  review: boolean;
}

export interface SourceImpact {
  source: string;
  detector: string;
  exposureS: number;
  seed: number;
  simulatedCounts: number;
  converged: { newer: boolean; older: boolean };
  cstat: { newer: number; older: number };
  parameters: ParameterShift[];
  bands: BandRatio[];
}

export interface ImpactInput {
  detector: string;
  source: ReferenceSource;
  newer: FoldingResponse;
  older: FoldingResponse;
  bands: readonly Band[];
  tolerance: ImpactTolerance;
}

export function sourceImpact(x: ImpactInput, onProgress?: (line: string) => void): SourceImpact {
  const m = modelOf(x.source);
  if (x.newer.detchans !== x.older.detchans)
    throw new KilnInputError('the two responses have different channel counts', { field: 'DETCHANS', value: x.older.detchans, expected: `${x.newer.detchans}, as in the newer response` });
  const gNew = gridOf(x.newer, m);
  const gOld = gridOf(x.older, m);
  const perSecond = foldCounts(x.newer, binnedPhotonFlux(gNew, m), 1);
  const rate = sum(perSecond);
  const exposureS = rate > 0 ? Math.max(x.source.exposureS, IMPACT_MIN_COUNTS / rate) : x.source.exposureS;
  const expected = perSecond.map((v) => v * exposureS);
  const counts = poissonDraws(expected, x.source.seed);
  const spec = { model: m, free: x.source.free, bounds: x.source.bounds };
  const stated = new Map(modelParameters(m).map((p) => [p.name, p.value]));
  onProgress?.(`${x.detector}/${x.source.id}: fit with the newer response`);
  const fNew = fitSpectrum({ response: x.newer, grid: gNew, counts, exposureS }, spec);
  onProgress?.(`${x.detector}/${x.source.id}: fit with the older response`);
  const fOld = fitSpectrum({ response: x.older, grid: gOld, counts, exposureS }, spec, { errors: false });
  const parameters: ParameterShift[] = fNew.parameters
    .filter((p) => p.free)
    .map((p) => {
      const o = fOld.parameters.find((q) => q.name === p.name)!;
      const err = symmetricError(p);
      const shift = o.value - p.value;
      const shiftSigma = err > 0 ? shift / err : 0;
      const truth = stated.get(p.name)!;
      return { name: p.name, unit: p.unit, truth, newer: p.value, newerError: err, older: o.value, shift, shiftSigma, review: Math.abs(shiftSigma) > x.tolerance.shiftSigma };
    });
  const ratesNew = bandRates(x.newer, perSecond, 1, x.bands);
  const ratesOld = bandRates(x.older, foldCounts(x.older, binnedPhotonFlux(gOld, m), 1), 1, x.bands);
  const bands: BandRatio[] = ratesNew.map((b, i) => {
    const o = ratesOld[i].rateCps;
    const ratio = o > 0 ? b.rateCps / o : null;
    return { name: b.name, loKeV: b.loKeV, hiKeV: b.hiKeV, newerRateCps: b.rateCps, olderRateCps: o, ratio, review: ratio === null ? b.rateCps > 0 : Math.abs(ratio - 1) > x.tolerance.rateRatio };
  });
  return {
    source: x.source.id,
    detector: x.detector,
    exposureS,
    seed: x.source.seed,
    simulatedCounts: sum(counts),
    converged: { newer: fNew.converged, older: fOld.converged },
    cstat: { newer: fNew.cstat, older: fOld.cstat },
    parameters,
    bands,
  };
}

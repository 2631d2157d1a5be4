/**
 * Site data of one detector of one release, taken from the products just built (the matrix rows,
 * the ARF components) and from the model that made them: nothing here is recomputed by pages.
 */
import { FWHM_PER_SIGMA } from '../physics/resolution.ts';
import { escapeInputsFor } from '../physics/escape-inputs.ts';
import { binIndexOf, buildParamsAt, expandRow, withTransferLoss } from '../response/index.ts';
import { detectorRegion, regionsOf, transferLossOf, type Region } from '../model/regions.ts';
import { fitCentroidLaw, fitFwhmLaw, type FitResult } from '../fit/index.ts';
import { isInputError } from '../errors.ts';
import type { RmfData } from '../response/types.ts';
import type { LineFit } from '../response/model-types.ts';
import type { DetectorSite, EfficiencyCurve, LineFitSite, MatrixImage, ParameterRow, ProfileSet, RegionCurves } from '../site-data/types.ts';
import { pick, thinIndices } from '../site-data/thin.ts';
import { rowSums } from '../checks/numbers-rmf.ts';
import type { DetectorJob } from './job.ts';
import type { DetectorProducts } from './product.ts';
import { lineEfficiencyModel, type LineRefits } from './validate.ts';

const EV_PER_KEV = 1000;
/** Points of the model curves on the plots (log-spaced). */
const CURVE_POINTS = 120;
/** Size of the downsampled matrix image (energy rows × channel columns). */
const IMAGE_ROWS = 160;
const IMAGE_COLUMNS = 256;
/** Log10 probability floor of the image: elements below it are shown as empty. */
const IMAGE_LOG10_FLOOR = -7;
/** Standard energies offered for line profiles, besides the calibration lines (keV). */
const PROFILE_ENERGIES_KEV = [0.3, 0.5, 1, 2, 3, 4.5, 6, 8, 10];
/** Significant digits kept in site JSON for plotted values (well below the plots' resolution). */
const SITE_DIGITS = 5;
/** Digits of curves that only feed plots (effective area, efficiencies): 1e-4 relative is far below a pixel. */
const CURVE_DIGITS = 4;
/**
 * The efficiency curve keeps the matrix bins a straight line between kept ones misses by more than
 * this fraction of the curve's span (on a log energy axis): a tenth of a pixel on a 1000-pixel
 * plot, so edges stay sharp while the document carries a fraction of the bins.
 */
const EFFICIENCY_THIN_TOLERANCE = 1e-4;
/** Digits of tabulated parameters: beyond any stated uncertainty. */
const PARAMETER_DIGITS = 6;

export function round(x: number, digits = SITE_DIGITS): number {
  if (x === 0 || !Number.isFinite(x)) return x;
  return Number(x.toPrecision(digits));
}

function logSpace(lo: number, hi: number, n: number): number[] {
  const a = Math.log(lo);
  const b = Math.log(hi);
  return Array.from({ length: n }, (_, i) => Math.exp(a + ((b - a) * i) / (n - 1)));
}


function profiles(rmf: RmfData, lineEnergies: number[]): ProfileSet {
  const emin = rmf.energLoKeV[0];
  const emax = rmf.energHiKeV[rmf.energHiKeV.length - 1];
  const wanted = [...new Set([...PROFILE_ENERGIES_KEV, ...lineEnergies].filter((e) => e >= emin && e < emax))].sort((a, b) => a - b);
  const eb = rmf.ebounds;
  const rows = wanted.map((e) => Array.from(expandRow(rmf.rows[binIndexOf(rmf.energLoKeV, rmf.energHiKeV, e)], rmf.detchans, rmf.firstChannel), (v) => round(v, 4)));
  return {
    channelEnergyKeV: Array.from(eb.eMinKeV, (lo, i) => round(0.5 * (lo + eb.eMaxKeV[i]), 6)),
    energiesKeV: wanted.map((e) => round(e, 6)),
    rows,
  };
}

/** Block-averaged log10 probability image of the matrix. */
/** The image's channel axis stops this far beyond the highest photon energy (room for the resolution). */
const IMAGE_CHANNEL_MARGIN = 1.05;

function matrixImage(rmf: RmfData): MatrixImage {
  const nE = rmf.rows.length;
  // Channels far above the highest photon energy hold nothing: leave them out of the picture.
  const eTop = rmf.energHiKeV[nE - 1] * IMAGE_CHANNEL_MARGIN;
  let nC = 0;
  while (nC < rmf.detchans && rmf.ebounds.eMinKeV[nC] < eTop) nC++;
  nC = Math.max(1, nC);
  const rowsOut = Math.min(IMAGE_ROWS, nE);
  const colsOut = Math.min(IMAGE_COLUMNS, nC);
  const sum = new Float64Array(rowsOut * colsOut);
  const count = new Float64Array(rowsOut * colsOut);
  for (let i = 0; i < nE; i++) {
    const r = Math.min(rowsOut - 1, Math.floor((i * rowsOut) / nE));
    const row = rmf.rows[i];
    let k = 0;
    for (let g = 0; g < row.fChan.length; g++) {
      for (let j = 0; j < row.nChan[g]; j++, k++) {
        const c = row.fChan[g] - rmf.firstChannel + j;
        if (c >= nC) continue;
        const col = Math.min(colsOut - 1, Math.floor((c * colsOut) / nC));
        sum[r * colsOut + col] += row.matrix[k];
      }
    }
  }
  // Each image cell averages the same number of matrix elements (rows × channels per block).
  for (let r = 0; r < rowsOut; r++)
    for (let c = 0; c < colsOut; c++) {
      const rowsIn = Math.ceil(((r + 1) * nE) / rowsOut) - Math.ceil((r * nE) / rowsOut);
      const colsIn = Math.ceil(((c + 1) * nC) / colsOut) - Math.ceil((c * nC) / colsOut);
      count[r * colsOut + c] = Math.max(1, rowsIn * colsIn);
    }
  let max = -Infinity;
  const log10: (number | null)[][] = [];
  for (let r = 0; r < rowsOut; r++) {
    const line: (number | null)[] = [];
    for (let c = 0; c < colsOut; c++) {
      const p = sum[r * colsOut + c] / count[r * colsOut + c];
      const l = p > 0 ? Math.log10(p) : null;
      if (l !== null && l > max) max = l;
      line.push(l !== null && l >= IMAGE_LOG10_FLOOR ? round(l, 3) : null);
    }
    log10.push(line);
  }
  const eb = rmf.ebounds;
  return {
    path: null,
    log10,
    energyKeV: [rmf.energLoKeV[0], rmf.energHiKeV[nE - 1]],
    channelEnergyKeV: [eb.eMinKeV[0], eb.eMaxKeV[nC - 1]],
    log10Range: [IMAGE_LOG10_FLOOR, Number.isFinite(max) ? round(max, 3) : 0],
  };
}

/** Fits of the laws to the line fits, for the site's residual panels and parameter tables; null when degenerate. */
function tryFit(f: () => FitResult): FitResult | null {
  try {
    return f();
  } catch (e) {
    if (isInputError(e)) return null;
    throw e;
  }
}

export interface DetectorSiteResult {
  site: DetectorSite;
  parameters: ParameterRow[];
  fits: { fwhm: FitResult | null; centroid: FitResult | null };
}

/**
 * Model line efficiency on the matrix energy grid for the detector's matrix and each region's: the
 * first epoch's detector QE (bin averages, as in its ARF) × each row's detected fraction.
 */
function efficiencyCurves(built: DetectorProducts): { curve: EfficiencyCurve; regions: Map<string, number[]> } | null {
  const ep = built.epochs[0];
  return ep ? efficiencyCurvesFrom(ep.epoch, ep.site.energyKeV, ep.site.detectorQE, built.redistribution.rmf, built.regionMatrices) : null;
}

/** The same from an epoch's QE (per matrix bin) and the matrices; null when the grids differ. */
export function efficiencyCurvesFrom(epoch: string, energyKeV: number[], qe: number[], rmf: RmfData, regionMatrices: { label: string; rmf: RmfData }[] = []): { curve: EfficiencyCurve; regions: Map<string, number[]> } | null {
  if (qe.length !== rmf.rows.length || energyKeV.length !== qe.length) return null;
  const times = (sums: Float64Array) => qe.map((q, i) => q * sums[i]);
  const whole = times(rowSums(rmf));
  const regional = regionMatrices.map((r) => ({ label: r.label, values: times(rowSums(r.rmf)) }));
  const keep = thinIndices(energyKeV, [whole, ...regional.map((r) => r.values)], { tolerance: EFFICIENCY_THIN_TOLERANCE });
  const rounded = (v: number[]) => pick(v, keep).map((x) => round(x, CURVE_DIGITS));
  return {
    curve: { epoch, energyKeV: pick(energyKeV, keep).map((x) => round(x, 6)), detected: rounded(whole) },
    regions: new Map(regional.map((r) => [r.label, rounded(r.values)])),
  };
}

/** The whole detector's profile parameters as its matrix is built, and the tail's share of events. */
export function detectorParamsAt(job: DetectorJob): { paramsAt: ReturnType<typeof buildParamsAt>; tailOf: (p: ReturnType<ReturnType<typeof buildParamsAt>>) => number } {
  const { detector } = job;
  const spec = detector.redistribution;
  const silicon = spec.escape || spec.siFluorescenceFraction > 0 ? escapeInputsFor(detector.stack.sensor.material.formula) : undefined;
  const r = detectorRegion(detector);
  const paramsAt = withTransferLoss(buildParamsAt(r.spec, detector.lineFits, { silicon, file: detector.lineFitsFile, sensor: detector.stack.sensor }), transferLossOf(r), r.spec.pairEnergyEv);
  // For the collection model: the partial-charge share of its layer.
  return { paramsAt, tailOf: (p) => (spec.tail.source === 'collection' ? (p.partial?.fraction ?? 0) : p.tailFraction) };
}

/** A line's profile fields for the site: the line fit's tail, shelf and efficiency with errors, the closure refit, the model efficiency. */
export function lineFitExtras(job: DetectorJob, rmf: RmfData, refits?: LineRefits): Map<LineFit, Partial<LineFitSite>> {
  const lines = job.detector.lineFits;
  const withEff = lines.filter((l) => l.efficiency !== null);
  const modelEff = new Map(Array.from(lineEfficiencyModel(job, rmf, withEff.map((l) => l.energyKeV)), (v, i) => [withEff[i], v] as const));
  return new Map(
    lines.map((l) => {
      const refit = refits?.get(l);
      return [
        l,
        {
          efficiencyErr: l.efficiencyErr,
          tailFraction: l.tailFraction,
          tailFractionErr: l.tailFractionErr,
          shelfFraction: l.shelfFraction,
          shelfFractionErr: l.shelfFractionErr ?? null,
          ...(refits ? { refitTailFraction: refit ? round(refit.tailFraction) : null, refitShelfFraction: refit ? round(refit.shelfFraction) : null } : {}),
          modelEfficiency: modelEff.has(l) ? round(modelEff.get(l)!) : null,
        },
      ] as const;
    }),
  );
}

export function detectorSite(job: DetectorJob, built: DetectorProducts, refits?: LineRefits): DetectorSiteResult {
  const { detector } = job;
  const spec = detector.redistribution;
  const rmf = built.redistribution.rmf;
  const silicon = spec.escape || spec.siFluorescenceFraction > 0 ? escapeInputsFor(detector.stack.sensor.material.formula) : undefined;
  // The sensor too: a collection-model tail needs its partially collecting layer.
  // Each region's curves as its matrix is built: its own redistribution model and the transfer
  // loss of its band (the whole detector's band when the detector has regions).
  const paramsOf = (r: Region) =>
    withTransferLoss(buildParamsAt(r.spec, detector.lineFits, { silicon, file: detector.lineFitsFile, sensor: detector.stack.sensor }), transferLossOf(r), r.spec.pairEnergyEv);
  const paramsAt = paramsOf(detectorRegion(detector));
  const emin = rmf.energLoKeV[0];
  const emax = rmf.energHiKeV[rmf.energHiKeV.length - 1];
  const curveE = logSpace(emin, emax, CURVE_POINTS);
  const fwhmAt = (e: number) => paramsAt(e).sigmaKeV * FWHM_PER_SIGMA * EV_PER_KEV;
  const shiftAt = (e: number) => (paramsAt(e).centroidKeV - e) * EV_PER_KEV;
  const perRegion = regionsOf(detector, job.release.productsPer ?? 'detector').filter((r) => r.node !== null);
  // The tail's share of events: for the collection model, the partial-charge share of its layer.
  const tailOf = (p: ReturnType<typeof paramsAt>) => (spec.tail.source === 'collection' ? (p.partial?.fraction ?? 0) : p.tailFraction);
  const tailCurve = curveE.map((e) => round(tailOf(paramsAt(e))));
  const shelfCurve = curveE.map((e) => round(paramsAt(e).shelfFraction));
  const same = (a: number[], b: number[]) => a.every((v, i) => v === b[i]);
  const eff = efficiencyCurves(built);
  const regions: RegionCurves[] = perRegion.map((r) => {
    const p = paramsOf(r);
    const tail = curveE.map((e) => round(tailOf(p(e))));
    const shelf = curveE.map((e) => round(p(e).shelfFraction));
    const effR = eff?.regions.get(r.label);
    return {
      label: r.label,
      node: r.node!,
      rowBand: r.rowBand,
      fwhmEv: curveE.map((e) => round(p(e).sigmaKeV * FWHM_PER_SIGMA * EV_PER_KEV)),
      centroidOffsetEv: curveE.map((e) => round((p(e).centroidKeV - e) * EV_PER_KEV)),
      // A region's tail and shelf only where its model differs from the detector's (nodes usually differ in noise and gain only).
      ...(same(tail, tailCurve) ? {} : { tailFraction: tail }),
      ...(same(shelf, shelfCurve) ? {} : { shelfFraction: shelf }),
      ...(effR ? { efficiencyDetected: effR } : {}),
    };
  });

  const lines = detector.lineFits;
  const extras = lineFitExtras(job, rmf, refits);
  const lineFits: LineFitSite[] = lines.map((l) => {
    const mf = fwhmAt(l.energyKeV);
    const mc = paramsAt(l.energyKeV).centroidKeV;
    return {
      line: l.line,
      energyKeV: l.energyKeV,
      centroidKeV: l.centroidKeV,
      centroidErrEv: l.centroidErrEv,
      fwhmEv: l.fwhmEv,
      fwhmErrEv: l.fwhmErrEv,
      modelFwhmEv: round(mf),
      fwhmResidualEv: round(l.fwhmEv - mf),
      modelCentroidKeV: round(mc, 7),
      centroidResidualEv: round((l.centroidKeV - mc) * EV_PER_KEV),
      efficiency: l.efficiency,
      ...extras.get(l),
    };
  });
  const chi2 = (res: number[], err: number[]) => res.reduce((s, r, i) => s + (r / err[i]) ** 2, 0);
  const fw = spec.fwhm;
  const fwhmFit = lines.length >= 3
    ? tryFit(() => fitFwhmLaw(lines, { pairEnergyEv: spec.pairEnergyEv, pixelsPerEvent: fw.pixelsPerEvent, initial: { readNoiseE: fw.readNoiseE, fano: fw.fano, sigma0Ev: fw.sigma0Ev }, free: ['readNoiseE', 'fano'], fanoForLimit: fw.fano, file: detector.lineFitsFile }))
    : null;
  const cl = spec.centroid;
  const centroidFit = lines.length >= 3
    ? tryFit(() => fitCentroidLaw(lines, {
        initial: cl.source === 'law' ? { gainError: cl.gainError, offsetEv: cl.offsetEv, chargeLossEv: cl.chargeLossEv, chargeLossScaleKeV: cl.chargeLossScaleKeV } : {},
        free: lines.length >= 4 ? ['gainError', 'offsetEv', 'chargeLossEv'] : ['gainError', 'offsetEv'],
        file: detector.lineFitsFile,
      }))
    : null;

  const site: DetectorSite = {
    id: detector.id,
    name: detector.name,
    kind: detector.kind,
    epochs: built.epochs.map((e) => ({
      ...e.site,
      energyKeV: e.site.energyKeV.map((x) => round(x, 6)),
      mirrorCm2: e.site.mirrorCm2.map((x) => round(x, CURVE_DIGITS)),
      components: e.site.components.map((c) => ({ ...c, values: c.values.map((x) => round(x, CURVE_DIGITS)) })),
      detectorQE: e.site.detectorQE.map((x) => round(x, CURVE_DIGITS)),
      effectiveAreaCm2: e.site.effectiveAreaCm2.map((x) => round(x, CURVE_DIGITS)),
    })),
    resolution: {
      energyKeV: curveE.map((e) => round(e)),
      fwhmEv: curveE.map((e) => round(fwhmAt(e))),
      centroidOffsetEv: curveE.map((e) => round(shiftAt(e))),
      tailFraction: tailCurve,
      shelfFraction: shelfCurve,
      tailSource: spec.tail.source,
    },
    ...(eff ? { efficiency: eff.curve } : {}),
    ...(regions.length ? { regions } : {}),
    lineFits,
    fitQuality: {
      fwhmChi2: round(chi2(lineFits.map((l) => l.fwhmResidualEv), lines.map((l) => l.fwhmErrEv))),
      fwhmDof: lines.length,
      centroidChi2: round(chi2(lineFits.map((l) => l.centroidResidualEv), lines.map((l) => l.centroidErrEv))),
      centroidDof: lines.length,
    },
    profiles: profiles(rmf, lines.map((l) => l.energyKeV)),
    matrix: matrixImage(rmf),
  };
  return { site, parameters: parameterRows(job, fwhmFit, centroidFit), fits: { fwhm: fwhmFit, centroid: centroidFit } };
}

function parameterRows(job: DetectorJob, fwhmFit: FitResult | null, centroidFit: FitResult | null): ParameterRow[] {
  const d = job.detector;
  const spec = d.redistribution;
  const rows: ParameterRow[] = [];
  const add = (group: string, name: string, symbol: string | null, unit: string, value: number, uncertainty: number | null, source: ParameterRow['source']) =>
    rows.push({
      detector: d.id,
      group,
      name,
      symbol,
      unit,
      value: round(value, PARAMETER_DIGITS),
      uncertainty: uncertainty === null ? null : round(uncertainty, 3),
      source,
    });
  const res = 'resolution';
  add(res, 'pair creation energy', 'w', 'eV', spec.pairEnergyEv, null, 'input');
  add(res, `read noise (${spec.fwhm.source === 'law' ? 'law' : 'law shape; widths from line fits'})`, 'N_r', 'e⁻ RMS', spec.fwhm.readNoiseE, null, 'input');
  add(res, 'Fano factor', 'F', '', spec.fwhm.fano, null, 'input');
  add(res, 'constant width term', 'σ₀', 'eV', spec.fwhm.sigma0Ev, null, 'input');
  add(res, 'pixels per event at 0 keV', 'a', '', spec.fwhm.pixelsPerEvent.a, null, 'input');
  add(res, 'pixels per event slope', 'b', '1/keV', spec.fwhm.pixelsPerEvent.bPerKeV, null, 'input');
  if (fwhmFit) {
    add(res, 'read noise, fitted to line widths', 'N_r', 'e⁻ RMS', fwhmFit.params.readNoiseE, fwhmFit.errors.readNoiseE, 'fit');
    add(res, 'Fano factor, fitted to line widths', 'F', '', fwhmFit.params.fano, fwhmFit.errors.fano, 'fit');
    add(res, 'FWHM law fit χ²', 'χ²', '', fwhmFit.chi2, null, 'fit');
    add(res, 'FWHM law fit degrees of freedom', 'dof', '', fwhmFit.dof, null, 'fit');
  }
  const es = 'energy scale';
  const c = spec.centroid;
  if (c.source === 'law') {
    add(es, 'gain error', 'g', '', c.gainError, null, 'input');
    add(es, 'offset', null, 'eV', c.offsetEv, null, 'input');
    add(es, 'surface charge loss at 0 keV', null, 'eV', c.chargeLossEv, null, 'input');
    add(es, 'charge-loss energy scale', null, 'keV', c.chargeLossScaleKeV, null, 'input');
  }
  if (centroidFit) {
    add(es, 'gain error, fitted to centroids', 'g', '', centroidFit.params.gainError, centroidFit.errors.gainError, 'fit');
    add(es, 'offset, fitted to centroids', null, 'eV', centroidFit.params.offsetEv, centroidFit.errors.offsetEv, 'fit');
    if (centroidFit.free.includes('chargeLossEv'))
      add(es, 'surface charge loss, fitted', null, 'eV', centroidFit.params.chargeLossEv, centroidFit.errors.chargeLossEv, 'fit');
    add(es, 'centroid law fit χ²', 'χ²', '', centroidFit.chi2, null, 'fit');
    add(es, 'centroid law fit degrees of freedom', 'dof', '', centroidFit.dof, null, 'fit');
  }
  const pr = 'profile';
  if (spec.tail.source === 'law') {
    add(pr, 'tail fraction at 0 keV', null, '', spec.tail.fractionAtZero, null, 'input');
    add(pr, 'tail fraction energy scale', null, 'keV', spec.tail.fractionScaleKeV, null, 'input');
    add(pr, 'tail e-folding', null, 'eV', spec.tail.tailScaleEv, null, 'input');
  }
  if (spec.shelf.source === 'law') add(pr, 'shelf fraction', null, '', spec.shelf.fraction, null, 'input');
  add(pr, 'event threshold', null, 'keV', spec.thresholdKeV, null, 'input');
  add(pr, 'Si fluorescence fraction', null, '', spec.siFluorescenceFraction, null, 'input');
  const st = 'stack';
  for (const l of [...d.stack.filters, ...d.stack.surface]) add(st, `${l.name} (${l.material.formula}, ${l.material.densityGcm3} g/cm³)`, null, 'µm', l.thicknessUm, null, 'input');
  add(st, `depletion depth (${d.stack.sensor.material.formula})`, null, 'µm', d.stack.sensor.depletionUm, null, 'input');
  if (d.stack.sensor.partial) add(st, 'partially collecting layer', null, 'µm', d.stack.sensor.partial.thicknessUm, null, 'input');
  return rows;
}

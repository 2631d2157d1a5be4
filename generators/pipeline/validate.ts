/**
 * The build's checks of one detector: every product file through the same checks as `kiln check`,
 * the model's probability accounting, and closure against the line fits it was made from.
 */
import { checkEfficiencyClosure, checkFile, checkLineClosure, foldedLineEfficiency, makeCheck, fmt } from '../checks/index.ts';
import { binCentresKeV, efficiencyBreakdown, escapeInputsFor, stackFluorescence } from '../physics/index.ts';
import { countsStackFluorescence, DEFAULT_DROP_BUDGET, efficiencyOptionsFor } from '../response/index.ts';
import { closureSigma, DEFAULT_CLOSURE_TOLERANCES } from '../checks/index.ts';
import { jointBounds, jointClosureCheck, type ClosurePull } from '../checks/closure-joint.ts';
import { checkProfileClosure, profileQuantitiesOf } from '../checks/closure-profile.ts';
import type { ProfileRefit } from '../checks/profile-refit.ts';
import type { LineFit } from '../response/model-types.ts';
import { extrapolationChecks } from '../checks/extrapolation.ts';
import { epochAdequacyChecks } from '../checks/epoch-adequacy.ts';
import { defaultCheckSettings, type CheckSettings } from './check-settings.ts';
import type { Check } from '../site-data/types.ts';
import type { DetectorJob } from './job.ts';
import type { DetectorProducts } from './product.ts';
import { readFits } from '../fits/index.ts';
import { readRmf } from '../ogip/index.ts';
import type { RmfData } from '../response/types.ts';
import { validRange, type ValidRange } from '../response/valid-range.ts';

/** Row probability + reported losses must equal 1 to this (float64 accumulation over a few thousand channels). */
export const ACCOUNTING_TOLERANCE = 1e-6;


function accountingChecks(built: DetectorProducts, product: string): Check[] {
  const { rmf, losses } = built.redistribution;
  let worst = 0;
  let worstDropped = 0;
  for (let i = 0; i < rmf.rows.length; i++) {
    let s = 0;
    for (const v of rmf.rows[i].matrix) s += v;
    // Stored as float32: compare the float64 sum of the stored values plus losses against 1.
    const total = s + losses.thresholdLoss[i] + losses.outsideLoss[i] + losses.droppedByCut[i];
    worst = Math.max(worst, Math.abs(total - 1));
    worstDropped = Math.max(worstDropped, losses.droppedByCut[i]);
  }
  // float32 storage rounds each element by ≤ 2^-24 relative; allow that on top of the tolerance.
  const storage = 2 ** -24 * 4;
  return [
    makeCheck(worst <= ACCOUNTING_TOLERANCE + storage ? 'pass' : 'fail', {
      id: 'model.rows.accounted',
      title: 'every row: stored probability + threshold, outside and dropped losses = 1',
      product,
      measured: worst,
      tolerance: ACCOUNTING_TOLERANCE,
      unit: null,
      message: `largest |row sum + losses − 1| is ${fmt(worst)}`,
    }),
    makeCheck(worstDropped <= DEFAULT_DROP_BUDGET ? 'pass' : 'fail', {
      id: 'model.compression.dropped',
      title: 'probability dropped by the matrix element cut, per row',
      product,
      measured: worstDropped,
      tolerance: DEFAULT_DROP_BUDGET,
      unit: null,
      message: `largest dropped fraction of a row is ${fmt(worstDropped)} (LO_THRES ${fmt(rmf.loThres)})`,
    }),
  ];
}

/** Digits kept of a check's measured value in reports (the message keeps its own rounding). */
const MEASURED_DIGITS = 6;

export function tidyCheck(c: Check): Check {
  return typeof c.measured === 'number' && Number.isFinite(c.measured) && c.measured !== 0
    ? { ...c, measured: Number(c.measured.toPrecision(MEASURED_DIGITS)) }
    : c;
}

/**
 * "model.range.grid-channels": the energy grid covers the channels (README, "Valid range"); warns
 * with the complete-model range (also written in every product) when channels reach beyond it.
 */
function rangeCheck(r: ValidRange, product: string): Check {
  const stated = `complete for channels ${r.channels[0]}–${r.channels[1]} (${fmt(r.energyKeV[0])}–${fmt(r.energyKeV[1])} keV)`;
  return makeCheck(r.consistent ? 'pass' : 'warn', {
    id: 'model.range.grid-channels',
    title: 'energy grid and channel range consistent',
    product,
    measured: `${fmt(r.gridKeV[0])}–${fmt(r.gridKeV[1])} keV grid, ${fmt(r.channelSpanKeV[0])}–${fmt(r.channelSpanKeV[1])} keV channels`,
    tolerance: 'one channel width',
    unit: null,
    message: r.consistent ? `the grid covers the channels; ${stated}` : `${r.gaps.join('; ')}: the model is ${stated}`,
  });
}

/**
 * Model line efficiency at each energy, as closure.efficiency.* judges it: the stack's QE on the
 * first epoch's date (plus the stack's fluorescence photons where the matrix carries them, as the
 * ARF counts them) × the matrix row's detected fraction there.
 */
export function lineEfficiencyModel(job: DetectorJob, rmf: RmfData, energiesKeV: readonly number[]): Float64Array {
  if (!energiesKeV.length) return new Float64Array(0);
  const spec = job.detector.redistribution;
  const firstDate = job.detector.epochs[0].date;
  const e = Float64Array.from(energiesKeV);
  const qe = efficiencyBreakdown(job.detector.stack, e, firstDate, efficiencyOptionsFor(spec)).detectorQE;
  if (countsStackFluorescence(spec)) stackFluorescence(job.detector.stack, e, firstDate).forEach((f, i) => (qe[i] += f));
  return qe.map((q, i) => q * foldedLineEfficiency(rmf, e[i]));
}

/** Matrix rows refitted at each line by the closure checks, by line fit (names repeat across row bands); the site plots them beside the line fits. */
export type LineRefits = Map<LineFit, ProfileRefit | null>;

export function validateDetector(job: DetectorJob, built: DetectorProducts, refits?: LineRefits): Check[] {
  return validateDetectorRaw(job, built, refits).map(tidyCheck);
}

/**
 * Closure against the line fits: centroid, FWHM and efficiency (closure.ts), tail fraction, tail
 * scale and shelf from a refit of the rows (closure-profile.ts), every per-line check at the joint
 * bound z*, and the joint χ² per detector (closure-joint.ts).
 */
function closureChecks(job: DetectorJob, rmf: RmfData, rmfId: string, settings: CheckSettings, refits?: LineRefits): Check[] {
  const spec = job.detector.redistribution;
  const lines = job.detector.lineFits;
  const independent = {
    centroid: spec.centroid.source !== 'line-fits',
    fwhm: spec.fwhm.source !== 'line-fits',
    tail: spec.tail.source !== 'line-fits',
    shelf: spec.shelf.source !== 'line-fits',
  };
  // Measured line efficiencies are absolute (events in any channel per photon on the detector):
  // the model folds the stack's QE on the first epoch's date with the matrix row at the line.
  const withEff = lines.filter((l) => l.efficiency !== null);
  const n =
    lines.length * (Number(independent.centroid) + Number(independent.fwhm)) +
    withEff.length +
    lines.reduce((k, l) => k + profileQuantitiesOf(l).filter((q) => (q === 'shelf' ? independent.shelf : independent.tail)).length, 0);
  const joint = { falseAlarm: settings.closureFalseAlarm.value, detectors: settings.detectors, source: settings.closureFalseAlarm.source };
  const { zMax } = jointBounds(n, joint);
  const tol = { ...DEFAULT_CLOSURE_TOLERANCES, centroidSigma: zMax, fwhmSigma: zMax, efficiencySigma: zMax };
  const checks: Check[] = [];
  const pulls: ClosurePull[] = [];
  const pullFrom = (c: Check, line: string, quantity: ClosurePull['quantity'], sigma: number, unit: string, indep: boolean) => {
    if (typeof c.measured === 'number') pulls.push({ line, quantity, residual: c.measured, sigma, unit, independent: indep });
  };
  const modelEff = lineEfficiencyModel(job, rmf, withEff.map((l) => l.energyKeV));
  const silicon = spec.escape || spec.siFluorescenceFraction > 0 || spec.siFluorescenceSource === 'stack' ? escapeInputsFor(job.detector.stack.sensor.material.formula) : undefined;
  for (const line of lines) {
    const [c, f] = checkLineClosure(rmf, line, rmfId, tol, { binAveraged: true });
    checks.push(c, f);
    pullFrom(c, line.line, 'centroid', closureSigma(line.centroidErrEv, tol.centroidFloorEv), 'eV', independent.centroid);
    pullFrom(f, line.line, 'fwhm', closureSigma(line.fwhmErrEv, tol.fwhmFloorEv), 'eV', independent.fwhm);
    const prof = checkProfileClosure({
      rmf,
      line,
      ctx: { thresholdKeV: spec.thresholdKeV, siKAlphaKeV: silicon?.kAlphaKeV, siKEdgeKeV: silicon?.kEdgeKeV },
      product: rmfId,
      zMax,
      independent,
    });
    checks.push(...prof.checks);
    pulls.push(...prof.pulls);
    refits?.set(line, prof.refit);
  }
  withEff.forEach((line, i) => {
    const eff = checkEfficiencyClosure(modelEff[i], line, rmfId, tol);
    if (!eff) return;
    checks.push(eff);
    pullFrom(eff, line.line, 'efficiency', closureSigma(line.efficiencyErr, tol.efficiencyFloor), 'fraction', true);
  });
  checks.push(jointClosureCheck(pulls, joint, rmfId));
  return checks;
}

function validateDetectorRaw(job: DetectorJob, built: DetectorProducts, refits?: LineRefits): Check[] {
  const rmf = built.redistribution.rmf;
  // Accounting and closure are of the whole detector's matrix: per-region releases do not ship it, so name it by the detector.
  const rmfId = built.files.find((f) => f.kind === 'rmf' && f.node === undefined && f.rowBand === undefined)?.id ?? `${job.detector.id}-rmf`;
  return [...fileChecks(built.files, rmf), ...accountingChecks(built, rmfId), ...modelChecks(job, rmf, rmfId, built.validRange, refits)];
}

/** One product file as the checks see it: id, file name, kind and its (uncompressed) FITS bytes. */
export interface CheckedFile {
  id: string;
  name: string;
  kind: string;
  fits: Uint8Array;
}

/** Every product file through the same checks as `kiln check` (an ARF against the detector's matrix). */
function fileChecks(files: readonly CheckedFile[], rmf: RmfData | undefined): Check[] {
  return files.flatMap((f) => checkFile(f.fits, f.name, { product: f.id, rmf: f.kind === 'arf' ? rmf : undefined }).checks);
}

/** Checks of the model a matrix stands for: valid range, closure against the line fits, extrapolation, epochs. */
function modelChecks(job: DetectorJob, rmf: RmfData, rmfId: string, range: ValidRange, refits?: LineRefits): Check[] {
  const settings = job.checks ?? defaultCheckSettings();
  const checks: Check[] = [rangeCheck(range, rmfId), ...closureChecks(job, rmf, rmfId, settings, refits)];
  const grid = job.instrument.energyGrid;
  checks.push(
    ...extrapolationChecks(job.detector.redistribution, job.detector.lineFits, [grid.minKeV, grid.maxKeV], {
      product: rmfId,
      factor: settings.extrapolationFactor.value,
      failing: settings.failing,
      reasonFor: (p) => settings.extrapolationReasons[p],
    }),
  );
  checks.push(
    ...epochAdequacyChecks(job.detector.stack.contamination, job.detector.epochs, binCentresKeV(rmf.energLoKeV, rmf.energHiKeV), settings.epochTransmissionChange.value, {
      product: rmfId,
      failing: settings.failing,
      source: settings.epochTransmissionChange.source,
    }),
  );
  return checks;
}

/**
 * Today's checks on products made earlier (an archived release's bytes, read-only): the file
 * checks on every file and the model checks on its matrix, judged with the job's settings. What
 * needs the model's own loss bookkeeping (row accounting, dropped probability) is not in a file,
 * so it is not re-run. Null when the detector has no matrix among the files; with it, the matrix read.
 */
export function recheckDetector(job: DetectorJob, files: readonly CheckedFile[], refits?: LineRefits): { checks: Check[]; rmf: RmfData } | null {
  const rmfFile = files.find((f) => f.kind === 'rmf');
  if (!rmfFile) return null;
  const rmf = readRmf(readFits(rmfFile.fits, { fileName: rmfFile.name })).data;
  const spec = job.detector.redistribution;
  const range = validRange(job.instrument.channels, job.instrument.energyGrid, spec.thresholdKeV);
  return { checks: [...fileChecks(files, rmf), ...modelChecks(job, rmf, rmfFile.id, range, refits)].map(tidyCheck), rmf };
}

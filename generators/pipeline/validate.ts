/**
 * The build's checks of one detector: every product file through the same checks as `kiln check`,
 * the model's probability accounting, and closure against the line fits it was made from.
 */
import { checkEfficiencyClosure, checkFile, checkLineClosure, foldedLineEfficiency, makeCheck, fmt } from '../checks/index.ts';
import { efficiencyBreakdown } from '../physics/index.ts';
import { DEFAULT_DROP_BUDGET } from '../response/index.ts';
import type { Check } from '../site-data/types.ts';
import type { DetectorJob } from './job.ts';
import type { DetectorProducts } from './product.ts';

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

export function validateDetector(job: DetectorJob, built: DetectorProducts): Check[] {
  return validateDetectorRaw(job, built).map(tidyCheck);
}

function validateDetectorRaw(job: DetectorJob, built: DetectorProducts): Check[] {
  const checks: Check[] = [];
  const rmf = built.redistribution.rmf;
  for (const f of built.files) {
    const r = checkFile(f.fits, f.name, { product: f.id, rmf: f.kind === 'arf' ? rmf : undefined });
    checks.push(...r.checks);
  }
  // Accounting and closure are of the whole detector's matrix: per-region releases do not ship it, so name it by the detector.
  const rmfId = built.files.find((f) => f.kind === 'rmf' && f.node === undefined && f.rowBand === undefined)?.id ?? `${job.detector.id}-rmf`;
  checks.push(...accountingChecks(built, rmfId));
  // Measured line efficiencies are absolute (events in any channel per photon on the detector):
  // the model folds the stack's QE on the first epoch's date with the matrix row at the line.
  const firstDate = job.detector.epochs[0].date;
  const withEff = job.detector.lineFits.filter((l) => l.efficiency !== null);
  const qe = withEff.length
    ? efficiencyBreakdown(job.detector.stack, Float64Array.from(withEff, (l) => l.energyKeV), firstDate).detectorQE
    : new Float64Array(0);
  for (const line of job.detector.lineFits) checks.push(...checkLineClosure(rmf, line, rmfId, undefined, { binAveraged: true }));
  withEff.forEach((line, i) => {
    const eff = checkEfficiencyClosure(qe[i] * foldedLineEfficiency(rmf, line.energyKeV), line, rmfId);
    if (eff) checks.push(eff);
  });
  return checks;
}

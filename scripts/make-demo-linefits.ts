/**
 * Writes the invented demo line fits, content/releases/<id>/linefits/<detector>.csv, from the
 * stated truth in scripts/demo-truth.ts with seeded Gaussian scatter whose size is the error
 * written beside each value (so χ²/dof of a fit of the true law is ≈ 1).
 *
 *   node --import tsx scripts/make-demo-linefits.ts           write the files
 *   node --import tsx scripts/make-demo-linefits.ts --check   exit 1 if the committed files differ
 *
 * Deterministic: same truth and seed → same bytes.
 */
import { readFile, writeFile, mkdir } from 'node:fs/promises';
import { dirname, join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { FWHM_PER_SIGMA, fanoLimitFwhmEv, fwhmEv } from '../generators/physics/resolution.ts';
import { efficiencyBreakdown } from '../generators/physics/efficiency.ts';
import { escapeInputsFor } from '../generators/physics/escape-inputs.ts';
import { loadInstrumentFile, stackFromInput } from '../generators/content/index.ts';
import { buildRedistribution } from '../generators/response/redistribution.ts';
import { refitProfileAt } from '../generators/checks/profile-refit.ts';
import type { RedistributionSpec } from '../generators/response/model-types.ts';
import { DEMO_TRUTH, LINE_ENERGIES_KEV, type DetectorTruth, type ReleaseTruth } from './demo-truth.ts';

const EV_PER_KEV = 1000;
/** Systematic floors of the invented analysis: gain calibration (centroid) and line-shape model (FWHM). */
const CENTROID_FLOOR_EV = 0.3;
const FWHM_FLOOR_EV = 0.5;
/** Relative scatter of the fitted tail e-folding scale (its 1σ, written where the optional column is). */
const TAIL_SCALE_REL_SCATTER = 0.05;
/** Smallest tail fraction used in the binomial error, so that a vanishing tail still has a finite error. */
const TAIL_ERR_FLOOR_FRACTION = 1e-4;

import { gaussian, mulberry32 } from './prng.ts';
import { meanTransfers, transferShiftKeV, transferVarianceKeV2, type TransferBand } from '../generators/physics/transfer-loss.ts';

export { mulberry32, gaussian };

export function truthCentroidKeV(d: DetectorTruth, energyKeV: number): number {
  const c = d.centroid;
  const shiftEv = c.gainError * energyKeV * EV_PER_KEV + c.offsetEv - c.chargeLossEv * Math.exp(-energyKeV / c.chargeLossScaleKeV);
  return energyKeV + shiftEv / EV_PER_KEV;
}

export function truthFwhmEv(d: DetectorTruth, energyKeV: number): number {
  return fwhmEv(energyKeV, { pairEnergyEv: d.pairEnergyEv, ...d.fwhm });
}

export function truthTailFraction(d: DetectorTruth, energyKeV: number): number {
  return d.tail.fractionAtZero * Math.exp(-energyKeV / d.tail.fractionScaleKeV);
}

const HEADER = 'line,energy_keV,centroid_keV,centroid_err_eV,fwhm_eV,fwhm_err_eV,tail_fraction,tail_fraction_err,tail_scale_eV,shelf_fraction,efficiency,efficiency_err';
/** Optional columns, written where the truth has a partially collecting layer. */
const EXTRA_HEADER = ',tail_scale_err_eV,shelf_fraction_err';

export interface ProfileTruth {
  tailFraction: number;
  tailScaleEv: number;
  shelfFraction: number;
}

/**
 * Tail and shelf a line fit measures on the true partial-charge response (DetectorTruth.partialTruth):
 * the true sensor's matrix row at the line refitted with core + tail + shelf.
 */
export async function truePartialProfile(t: ReleaseTruth, detector: string): Promise<(energyKeV: number) => ProfileTruth> {
  const ins = await loadInstrumentFile(join(ROOT, 'content', 'instruments', 'quillon-tarncam', 'instrument.yaml'));
  const doc = ins.detectors.find((x) => x.id === detector);
  const d = t.detectors[detector];
  if (!doc || !d.partialTruth) throw new Error(`${t.release} ${detector}: no partial-layer truth`);
  const base = stackFromInput(doc.stack);
  const stack = { ...base, sensor: { ...base.sensor, partial: d.partialTruth } };
  const spec: RedistributionSpec = {
    ...doc.redistribution,
    pairEnergyEv: d.pairEnergyEv,
    fwhm: { source: 'law', ...d.fwhm },
    centroid: { source: 'law', ...d.centroid },
    tail: { source: 'collection' },
    shelf: { source: 'law', ...d.shelf },
  };
  const silicon = escapeInputsFor(stack.sensor.material.formula);
  const r = buildRedistribution({ spec, lineFits: [], energy: ins.energyGrid, channels: ins.channels, meta: { telescop: ins.telescope, instrume: ins.instrument, filter: 'NONE', chantype: 'PI', date: '2000-01-01' }, silicon, stack });
  return (e) => {
    const f = refitProfileAt(r.rmf, e, { thresholdKeV: spec.thresholdKeV, siKAlphaKeV: silicon.kAlphaKeV, siKEdgeKeV: silicon.kEdgeKeV, start: { tailFraction: 0.05, tailScaleEv: 60, shelfFraction: d.shelf.fraction } });
    if (!f) throw new Error(`${t.release} ${detector}: no refit at ${e} keV`);
    return { tailFraction: f.tailFraction, tailScaleEv: f.tailScaleEv, shelfFraction: f.shelfFraction };
  };
}

/** A line after transfer over a band: centroid lowered by the charge lost, σ² raised by its variance (physics/transfer-loss.ts). */
export function afterTransfer(d: DetectorTruth, e: number, centroidKeV: number, fwhmEv: number, band: TransferBand | null): { centroidKeV: number; fwhmEv: number } {
  if (!d.transferLoss || !band) return { centroidKeV, fwhmEv };
  const shift = transferShiftKeV(d.transferLoss, e, centroidKeV, meanTransfers(band));
  const varEv2 = transferVarianceKeV2(d.transferLoss, e, centroidKeV, band, d.pairEnergyEv) * EV_PER_KEV * EV_PER_KEV;
  return { centroidKeV: centroidKeV - shift, fwhmEv: Math.sqrt(fwhmEv * fwhmEv + FWHM_PER_SIGMA * FWHM_PER_SIGMA * varEv2) };
}

/** Half-width of the one-bin energy grid used to take the true detected fraction at a line (keV). */
const LINE_BIN_HALF_WIDTH_KEV = 0.0005;

/**
 * True detection efficiency at a line: the instrument's stack (QE) times the fraction of events
 * the true profile puts in a channel above the threshold, for the demo truth of this detector.
 */
export async function trueLineEfficiency(t: ReleaseTruth, detector: string): Promise<(energyKeV: number) => number> {
  const ins = await loadInstrumentFile(join(ROOT, 'content', 'instruments', 'quillon-tarncam', 'instrument.yaml'));
  const doc = ins.detectors.find((x) => x.id === detector);
  if (!doc) throw new Error(`no detector ${detector} in the demo instrument`);
  const d = t.detectors[detector];
  const stack = stackFromInput(doc.stack);
  const spec: RedistributionSpec = {
    ...doc.redistribution,
    pairEnergyEv: d.pairEnergyEv,
    fwhm: { source: 'law', ...d.fwhm },
    centroid: { source: 'law', ...d.centroid },
    tail: { source: 'law', ...d.tail },
    shelf: { source: 'law', ...d.shelf },
  };
  const silicon = escapeInputsFor(stack.sensor.material.formula);
  // Absolute efficiencies belong to ground calibration, before any contamination.
  if (stack.contamination) throw new Error(`${t.release} ${detector}: the demo gives efficiencies only for a clean (ground) stack`);
  return (e) => {
    const qe = efficiencyBreakdown(stack, Float64Array.of(e), null).detectorQE[0];
    const bins = { loKeV: Float64Array.of(e - LINE_BIN_HALF_WIDTH_KEV), hiKeV: Float64Array.of(e + LINE_BIN_HALF_WIDTH_KEV) };
    const r = buildRedistribution({ spec, lineFits: [], energy: bins, channels: ins.channels, meta: { telescop: ins.telescope, instrume: ins.instrument, filter: 'NONE', chantype: 'PI', date: '2000-01-01' }, silicon });
    let detected = 0;
    for (const v of r.rmf.rows[0].matrix) detected += v;
    return qe * (detected + r.losses.droppedByCut[0]);
  };
}

/** The CSV text for one detector of one release; `efficiencyAt` is the true efficiency (trueLineEfficiency). */
export function makeLineFitsCsv(
  t: ReleaseTruth,
  detector: string,
  efficiencyAt: (energyKeV: number) => number = () => NaN,
  profileAt?: (energyKeV: number) => ProfileTruth,
): string {
  const d = t.detectors[detector];
  if (!d) throw new Error(`no truth for ${detector} in ${t.release}`);
  // One stream per detector, so adding a detector does not change the others.
  const detIndex = Object.keys(t.detectors).indexOf(detector);
  const g = gaussian(mulberry32(t.seed + 7919 * (detIndex + 1)));
  const whole: TransferBand | null = t.wholeTransfers ? { firstTransfer: 0, lastTransfer: t.wholeTransfers - 1 } : null;
  const measured = [
    ...t.lines.map((l) => ({ ...l, band: whole, region: null as string | null })),
    ...(t.rowBands ?? []).flatMap((b) => b.lines.map((l) => ({ ...l, band: { firstTransfer: b.firstTransfer, lastTransfer: b.lastTransfer } as TransferBand, region: b.id as string | null }))),
  ];
  const rows = measured.map(({ line, counts, band, region }) => {
    const e = LINE_ENERGIES_KEV[line];
    const prof = profileAt?.(e);
    const tail = prof ? prof.tailFraction : truthTailFraction(d, e);
    const trueScaleEv = prof ? prof.tailScaleEv : d.tail.tailScaleEv;
    const trueShelf = prof ? prof.shelfFraction : d.shelf.fraction;
    const peakCounts = counts * (1 - tail - trueShelf);
    const moved = afterTransfer(d, e, truthCentroidKeV(d, e), truthFwhmEv(d, e), band);
    const fwhm = moved.fwhmEv;
    const sigma = fwhm / FWHM_PER_SIGMA;
    const centroidErr = Math.hypot(sigma / Math.sqrt(peakCounts), CENTROID_FLOOR_EV);
    const fwhmErr = Math.hypot(fwhm / Math.sqrt(2 * peakCounts), FWHM_FLOOR_EV);
    const tailErr = Math.sqrt((Math.max(tail, TAIL_ERR_FLOOR_FRACTION) * (1 - tail)) / counts);
    const centroid = moved.centroidKeV + (centroidErr * g()) / EV_PER_KEV;
    const fwhmMeasured = fwhm + fwhmErr * g();
    // A fit cannot return a negative fraction: it stops at the boundary.
    const tailMeasured = Math.max(0, tail + tailErr * g());
    const tailScale = trueScaleEv * (1 + TAIL_SCALE_REL_SCATTER * g());
    const shelfErr = Math.sqrt(trueShelf / counts);
    const shelf = Math.max(0, trueShelf + shelfErr * g());
    const limit = fanoLimitFwhmEv(e, d.pairEnergyEv, d.fwhm.fano);
    if (!(fwhmMeasured > limit)) throw new Error(`${t.release} ${detector} ${line}: FWHM ${fwhmMeasured} eV below the Fano limit ${limit} eV`);
    let eff = ['', ''];
    if (d.efficiency) {
      const trueEff = efficiencyAt(e);
      if (!Number.isFinite(trueEff)) throw new Error(`${t.release} ${detector} ${line}: no true efficiency given`);
      eff = [(trueEff * (d.efficiency.value + d.efficiency.err * g())).toFixed(5), (trueEff * d.efficiency.err).toFixed(5)];
    }
    return [
      line,
      e.toFixed(4),
      centroid.toFixed(5),
      centroidErr.toFixed(2),
      fwhmMeasured.toFixed(2),
      fwhmErr.toFixed(2),
      tailMeasured.toFixed(5),
      tailErr.toFixed(5),
      tailScale.toFixed(1),
      shelf.toFixed(5),
      ...eff,
      ...(prof ? [(TAIL_SCALE_REL_SCATTER * trueScaleEv).toFixed(1), shelfErr.toFixed(5)] : []),
      ...(t.rowBands ? [region ?? ''] : []),
    ].join(',');
  });
  return [
    `# INVENTED demo data (fictional QUILLON telescope, TARNCAM camera, detector ${detector}), release ${t.release}.`,
    `# Setting: ${t.setting}.`,
    '# Drawn by scripts/make-demo-linefits.ts from the truth in scripts/demo-truth.ts; errors are 1 sigma.',
    HEADER + (profileAt ? EXTRA_HEADER : '') + (t.rowBands ? ',region' : ''),
    ...rows,
    '',
  ].join('\n');
}

const ROOT = join(dirname(fileURLToPath(import.meta.url)), '..');
export const demoLineFitsPath = (release: string, detector: string) => join(ROOT, 'content', 'releases', release, 'linefits', `${detector}.csv`);

/** The committed CSV of one detector of one release: true efficiency and, where the truth has a partial layer, its profile. */
export async function demoLineFitsCsv(t: ReleaseTruth, detector: string): Promise<string> {
  const efficiencyAt = Object.values(t.detectors).some((d) => d.efficiency) ? await trueLineEfficiency(t, detector) : undefined;
  const profileAt = t.detectors[detector].partialTruth ? await truePartialProfile(t, detector) : undefined;
  return makeLineFitsCsv(t, detector, efficiencyAt, profileAt);
}

async function main(check: boolean): Promise<number> {
  let differ = 0;
  for (const t of DEMO_TRUTH)
    for (const det of Object.keys(t.detectors)) {
      const file = demoLineFitsPath(t.release, det);
      const text = await demoLineFitsCsv(t, det);
      if (check) {
        const old = await readFile(file, 'utf8').catch(() => null);
        if (old !== text) {
          process.stderr.write(`differs: ${file}\n`);
          differ++;
        }
      } else {
        await mkdir(dirname(file), { recursive: true });
        await writeFile(file, text);
        process.stdout.write(`wrote ${file}\n`);
      }
    }
  return differ ? 1 : 0;
}

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) {
  main(process.argv.includes('--check')).then((code) => process.exit(code));
}

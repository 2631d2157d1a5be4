/**
 * Products of one detector of one release: the RMF (one per detector: the redistribution does not
 * depend on the epoch), and per epoch the ARF (contamination grows with time) and, on request,
 * the full response (RSP = RMF × ARF). Pure: data in, FITS bytes and site data out, so the same
 * code can run in a worker thread or, later, in an observer's browser.
 */
import { binCentresKeV, efficiencyBreakdown, mirrorAreaAtBinCentres } from '../physics/index.ts';
import { escapeInputsFor } from '../physics/escape-inputs.ts';
import { buildRedistribution, energyGrid, type RedistributionResult } from '../response/index.ts';
import type { ArfData, ResponseMeta, RmfData } from '../response/types.ts';
import { writeArf, writeRmf } from '../ogip/index.ts';
import type { EpochSite } from '../site-data/types.ts';
import type { BuiltFile, DetectorJob } from './job.ts';
import { ALL_EPOCHS, productFileName, productId } from './names.ts';

/** OGIP FILTER value when the stack has no filter (OGIP CAL/GEN/92-002: 'NONE'). */
const NO_FILTER = 'NONE';
/** Longest FITS string value on one card (FITS 4.0 §4.2.1: 68 characters). */
const MAX_FITS_STRING = 68;

export interface EpochProducts {
  epoch: string;
  arf: ArfData;
  site: EpochSite;
}

export interface DetectorProducts {
  files: BuiltFile[];
  redistribution: RedistributionResult;
  epochs: EpochProducts[];
}

function filterName(job: DetectorJob): string {
  const names = job.detector.stack.filters.map((f) => f.name);
  const s = names.length ? names.join('+') : NO_FILTER;
  // A quote takes two characters on the card (FITS 4.0 §4.2.1.1), so count it twice.
  let cut = s;
  while (cut.replace(/'/g, "''").length > MAX_FITS_STRING) cut = cut.slice(0, -1);
  return cut;
}

function metaFor(job: DetectorJob, validFrom: string, extra: string[]): ResponseMeta {
  return {
    telescop: job.instrument.telescope,
    instrume: job.instrument.instrument,
    detnam: job.detector.id.toUpperCase(),
    filter: filterName(job),
    chantype: 'PI',
    date: job.release.date,
    // CVSD0001/CVST0001: first observation date the product is valid for (OGIP CAL/GEN/92-011, from memory).
    extraKeywords: [
      { keyword: 'CVSD0001', value: validFrom, comment: 'date from which the product is valid' },
      { keyword: 'CVST0001', value: '00:00:00', comment: 'time from which the product is valid' },
      { keyword: 'KILNREL', value: job.release.id, comment: 'Kiln release id' },
    ],
    history: [`Kiln release ${job.release.id}, instrument ${job.instrument.id}, detector ${job.detector.id}`, ...extra],
  };
}

/** Validity of the whole detector: first epoch's start to last epoch's end. */
function detectorValidity(job: DetectorJob): { validFrom: string; validTo: string | null } {
  const eps = job.detector.epochs;
  return { validFrom: eps[0].validFrom, validTo: eps[eps.length - 1].validTo };
}

/** The full response: each row of the redistribution scaled by the effective area of its bin. */
function fullResponse(rmf: RmfData, arf: ArfData, meta: ResponseMeta): RmfData {
  return {
    ...rmf,
    meta,
    hduclas3: 'FULL',
    rows: rmf.rows.map((row, i) => ({ fChan: row.fChan, nChan: row.nChan, matrix: row.matrix.map((v) => v * arf.specrespCm2[i]) })),
  };
}

export function buildDetectorProducts(job: DetectorJob): DetectorProducts {
  const { detector, instrument, release } = job;
  const spec = detector.redistribution;
  const sensorFormula = detector.stack.sensor.material.formula;
  const silicon = spec.escape || spec.siFluorescenceFraction > 0 ? escapeInputsFor(sensorFormula) : undefined;
  const bins = energyGrid(instrument.energyGrid, 'energyGrid');
  const whole = detectorValidity(job);
  const files: BuiltFile[] = [];

  const redistribution = buildRedistribution({
    spec,
    lineFits: detector.lineFits,
    energy: bins,
    channels: instrument.channels,
    meta: metaFor(job, whole.validFrom, ['Redistribution matrix (HDUCLAS3 REDIST)']),
    silicon,
    file: detector.lineFitsFile,
  });
  if (release.products.includes('rmf')) {
    files.push({
      id: productId(detector.id, ALL_EPOCHS, 'rmf'),
      kind: 'rmf',
      detector: detector.id,
      epoch: ALL_EPOCHS,
      name: productFileName(instrument.id, detector.id, ALL_EPOCHS, release.id, 'rmf'),
      fits: writeRmf(redistribution.rmf),
      ...whole,
    });
  }

  const centres = binCentresKeV(bins.loKeV, bins.hiKeV);
  const mirrorCm2 = mirrorAreaAtBinCentres(instrument.mirror, bins.loKeV, bins.hiKeV);
  const epochs: EpochProducts[] = [];
  for (const epoch of detector.epochs) {
    const eff = efficiencyBreakdown(detector.stack, centres, epoch.date);
    const specrespCm2 = mirrorCm2.map((a, i) => a * eff.detectorQE[i]);
    const meta = metaFor(job, epoch.validFrom, [
      `Effective area for epoch ${epoch.id} (reference date ${epoch.date}; contamination ${eff.contaminationUm.toFixed(4)} um)`,
    ]);
    const arf: ArfData = { meta, energLoKeV: bins.loKeV, energHiKeV: bins.hiKeV, specrespCm2 };
    const validity = { validFrom: epoch.validFrom, validTo: epoch.validTo };
    if (release.products.includes('arf'))
      files.push({
        id: productId(detector.id, epoch.id, 'arf'),
        kind: 'arf',
        detector: detector.id,
        epoch: epoch.id,
        name: productFileName(instrument.id, detector.id, epoch.id, release.id, 'arf'),
        fits: writeArf(arf),
        ...validity,
      });
    if (release.products.includes('rsp'))
      files.push({
        id: productId(detector.id, epoch.id, 'rsp'),
        kind: 'rsp',
        detector: detector.id,
        epoch: epoch.id,
        name: productFileName(instrument.id, detector.id, epoch.id, release.id, 'rsp'),
        fits: writeRmf(fullResponse(redistribution.rmf, arf, { ...meta, history: [...(meta.history ?? []), 'Full response: redistribution x effective area'] })),
        ...validity,
      });
    epochs.push({
      epoch: epoch.id,
      arf,
      site: {
        id: epoch.id,
        date: epoch.date,
        validFrom: epoch.validFrom,
        validTo: epoch.validTo,
        energyKeV: Array.from(centres),
        mirrorCm2: Array.from(mirrorCm2),
        components: eff.components.map((c) => ({ name: c.name, kind: c.kind === 'sensor' ? 'detector' : c.kind, values: Array.from(c.values) })),
        detectorQE: Array.from(eff.detectorQE),
        effectiveAreaCm2: Array.from(specrespCm2),
      },
    });
  }
  return { files, redistribution, epochs };
}

/**
 * Products of one detector of one release: the RMF (one per detector: the redistribution does not
 * depend on the epoch), and per epoch the ARF (contamination grows with time) and, on request,
 * the full response (RSP = RMF × ARF). Pure: data in, FITS bytes and site data out, so the same
 * code can run in a worker thread or, later, in an observer's browser.
 */
import { binCentresKeV, effectiveArea, efficiencyBreakdown, mirrorAreaAtBinCentres } from '../physics/index.ts';
import { escapeInputsFor } from '../physics/escape-inputs.ts';
import { buildRedistribution, countsStackFluorescence, efficiencyOptionsFor, energyGrid, fluorescencePerIncident, type RedistributionResult } from '../response/index.ts';
import type { ArfData, ResponseMeta, RmfData } from '../response/types.ts';
import { writeArf, writeRmf } from '../ogip/index.ts';
import type { EpochSite } from '../site-data/types.ts';
import type { BuiltFile, DetectorJob } from './job.ts';
import { ALL_EPOCHS, productFileName, productId } from './names.ts';
import { validRange, type ValidRange } from '../response/valid-range.ts';

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
  /** Channels and energies the model covers completely (written in every product). */
  validRange: ValidRange;
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

/**
 * Kiln's own validity keywords (README, "Keywords Kiln writes"): observation dates the product
 * applies to and the energy (and, for matrices, channel) range its model covers completely.
 * Other archives' indexing keyword sets are not written (tests/pipeline/keywords.test.ts).
 */
function validityKeywords(validFrom: string, validTo: string | null, range: ValidRange, withChannels: boolean): NonNullable<ResponseMeta['extraKeywords']> {
  return [
    { keyword: 'KVALFROM', value: validFrom, comment: 'Kiln: first observation date the product is for' },
    { keyword: 'KVALTO', value: validTo ?? 'open', comment: 'Kiln: valid before this date (open: no end)' },
    { keyword: 'KEVALLO', value: range.energyKeV[0], comment: '[keV] Kiln: lower end of the complete model' },
    { keyword: 'KEVALHI', value: range.energyKeV[1], comment: '[keV] Kiln: upper end of the complete model' },
    ...(withChannels
      ? [
          { keyword: 'KCHVALLO', value: range.channels[0], comment: 'Kiln: first channel the model covers fully' },
          { keyword: 'KCHVALHI', value: range.channels[1], comment: 'Kiln: last channel the model covers fully' },
        ]
      : []),
  ];
}

function metaFor(job: DetectorJob, validity: { validFrom: string; validTo: string | null }, range: ValidRange, withChannels: boolean, extra: string[]): ResponseMeta {
  return {
    telescop: job.instrument.telescope,
    instrume: job.instrument.instrument,
    detnam: job.detector.id.toUpperCase(),
    filter: filterName(job),
    chantype: 'PI',
    date: job.release.date,
    extraKeywords: [
      { keyword: 'KILNREL', value: job.release.id, comment: 'Kiln release id' },
      ...validityKeywords(validity.validFrom, validity.validTo, range, withChannels),
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
  const silicon = spec.escape || spec.siFluorescenceFraction > 0 || countsStackFluorescence(spec) ? escapeInputsFor(sensorFormula) : undefined;
  const bins = energyGrid(instrument.energyGrid, 'energyGrid');
  const whole = detectorValidity(job);
  const range = validRange(instrument.channels, instrument.energyGrid, spec.thresholdKeV);
  const files: BuiltFile[] = [];

  const redistribution = buildRedistribution({
    spec,
    lineFits: detector.lineFits,
    energy: bins,
    channels: instrument.channels,
    meta: metaFor(job, whole, range, true, ['Redistribution matrix (HDUCLAS3 REDIST)']),
    silicon,
    stack: detector.stack,
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
      validEnergyKeV: range.energyKeV,
      validChannels: range.channels,
    });
  }

  const centres = binCentresKeV(bins.loKeV, bins.hiKeV);
  const mirrorCm2 = mirrorAreaAtBinCentres(instrument.mirror, bins.loKeV, bins.hiKeV);
  const effOpts = efficiencyOptionsFor(spec);
  const epochs: EpochProducts[] = [];
  for (const epoch of detector.epochs) {
    // Components are plotted at the bin centres; SPECRESP and the plotted QE are bin averages.
    const eff = efficiencyBreakdown(detector.stack, centres, epoch.date, effOpts);
    const averaged = effectiveArea(detector.stack, instrument.mirror, bins.loKeV, bins.hiKeV, epoch.date, {
      ...effOpts,
      extraPerIncident: countsStackFluorescence(spec) ? fluorescencePerIncident(detector.stack, epoch.date) : undefined,
    });
    const specrespCm2 = averaged.specrespCm2;
    const validity = { validFrom: epoch.validFrom, validTo: epoch.validTo };
    const arfHistory = `Effective area for epoch ${epoch.id} (reference date ${epoch.date}; contamination ${eff.contaminationUm.toFixed(4)} um)`;
    const meta = metaFor(job, validity, range, false, [arfHistory]);
    const arf: ArfData = { meta, energLoKeV: bins.loKeV, energHiKeV: bins.hiKeV, specrespCm2 };
    if (release.products.includes('arf'))
      files.push({
        id: productId(detector.id, epoch.id, 'arf'),
        kind: 'arf',
        detector: detector.id,
        epoch: epoch.id,
        name: productFileName(instrument.id, detector.id, epoch.id, release.id, 'arf'),
        fits: writeArf(arf),
        ...validity,
        validEnergyKeV: range.energyKeV,
      });
    if (release.products.includes('rsp'))
      files.push({
        id: productId(detector.id, epoch.id, 'rsp'),
        kind: 'rsp',
        detector: detector.id,
        epoch: epoch.id,
        name: productFileName(instrument.id, detector.id, epoch.id, release.id, 'rsp'),
        fits: writeRmf(fullResponse(redistribution.rmf, arf, metaFor(job, validity, range, true, [arfHistory, 'Full response: redistribution x effective area']))),
        ...validity,
        validEnergyKeV: range.energyKeV,
        validChannels: range.channels,
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
        detectorQE: Array.from(averaged.detectorQE),
        effectiveAreaCm2: Array.from(specrespCm2),
      },
    });
  }
  return { files, redistribution, epochs, validRange: range };
}

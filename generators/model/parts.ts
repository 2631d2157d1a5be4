/**
 * The pieces every product is made of, shared by the build (pipeline/product.ts) and a single
 * response case (case.ts): header values with the HISTORY record of the case, the matrix of a
 * region, and the effective area on a date. One code path, so a case equal to a published
 * product gives the published bytes. Pure.
 */
import { binCentresKeV, effectiveArea, efficiencyBreakdown, mirrorAreaAtBinCentres, type EfficiencyBreakdown } from '../physics/index.ts';
import { buildRedistribution, countsStackFluorescence, efficiencyOptionsFor, fluorescencePerIncident, localInput, type EnergyBins, type PortableRedistributionInput, type RedistributionResult } from '../response/index.ts';
import { validRange, type ValidRange } from '../response/valid-range.ts';
import type { ArfData, ResponseMeta, RmfData } from '../response/types.ts';
import type { ChannelGrid } from '../response/model-types.ts';
import type { Epoch } from '../content/types.ts';
import type { DetectorJob } from '../pipeline/job.ts';
import { transferLossOf, type Region } from './regions.ts';

/** OGIP FILTER value when the stack has no filter (OGIP CAL/GEN/92-002: 'NONE'). */
const NO_FILTER = 'NONE';
/** Longest FITS string value on one card (FITS 4.0 §4.2.1: 68 characters). */
const MAX_FITS_STRING = 68;

function filterName(job: DetectorJob): string {
  const names = job.detector.stack.filters.map((f) => f.name);
  // A configuration states its own FILTER value (checked as a FITS string by the content schema).
  const s = job.detector.configuration?.filter ?? (names.length ? names.join('+') : NO_FILTER);
  // A quote takes two characters on the card (FITS 4.0 §4.2.1.1), so count it twice.
  let cut = s;
  while (cut.replace(/'/g, "''").length > MAX_FITS_STRING) cut = cut.slice(0, -1);
  return cut;
}

/** The energy grid of a case: the model's own, or one the observer chose (described for HISTORY). */
export interface CaseGrid {
  bins: EnergyBins;
  /** "model grid" or e.g. "0.3-10 keV, 500 linear bins". */
  text: string;
}

/** What a product was made for, as recorded in HISTORY (the RMF does not depend on the date, the ARF not on the region). */
export interface CaseChoice {
  region: Region;
  grid: CaseGrid;
  /** Channels merged per output channel (1 = the model's channel grid). */
  group: number;
}

function regionText(job: DetectorJob, r: Region): string {
  const node = r.node ?? 'all';
  const rows = r.band ? `${r.rowBand ?? 'all'} (transfers ${r.band.firstTransfer}-${r.band.lastTransfer})` : 'all';
  return `detector ${job.detector.id}, node ${node}, rows ${rows}`;
}

function modelLines(job: DetectorJob): string[] {
  return job.modelSha256 ? ['Model document (kiln/model/1) SHA-256:', job.modelSha256] : [];
}

/** What a product states about its validity: observation dates, and the range its model covers completely. */
export interface ValidityStamp {
  validFrom: string;
  validTo: string | null;
  range: ValidRange;
  /** Matrices also state their channel range. */
  channels: boolean;
}

/**
 * Kiln's own validity keywords (README, "Keywords Kiln writes"): observation dates the product
 * applies to and the energy (and, for matrices, channel) range its model covers completely.
 * Other archives' indexing keyword sets are not written (tests/pipeline/keywords.test.ts).
 */
function validityKeywords(v: ValidityStamp): NonNullable<ResponseMeta['extraKeywords']> {
  return [
    { keyword: 'KVALFROM', value: v.validFrom, comment: 'Kiln: first observation date the product is for' },
    { keyword: 'KVALTO', value: v.validTo ?? 'open', comment: 'Kiln: valid before this date (open: no end)' },
    { keyword: 'KEVALLO', value: v.range.energyKeV[0], comment: '[keV] Kiln: lower end of the complete model' },
    { keyword: 'KEVALHI', value: v.range.energyKeV[1], comment: '[keV] Kiln: upper end of the complete model' },
    ...(v.channels
      ? [
          { keyword: 'KCHVALLO', value: v.range.channels[0], comment: 'Kiln: first channel the model covers fully' },
          { keyword: 'KCHVALHI', value: v.range.channels[1], comment: 'Kiln: last channel the model covers fully' },
        ]
      : []),
  ];
}

export function metaFor(job: DetectorJob, validity: ValidityStamp, extra: string[]): ResponseMeta {
  return {
    telescop: job.instrument.telescope,
    instrume: job.instrument.instrument,
    detnam: (job.detector.configuration?.detector ?? job.detector.id).toUpperCase(),
    filter: filterName(job),
    chantype: 'PI',
    date: job.release.date,
    extraKeywords: [{ keyword: 'KILNREL', value: job.release.id, comment: 'Kiln release id' }, ...validityKeywords(validity)],
    history: [`Kiln release ${job.release.id}, instrument ${job.instrument.id}, detector ${job.detector.id}`, ...extra, ...modelLines(job)],
  };
}

/** The channels and energies a model covers completely: its (grouped) channels against its energy grid. */
export function validRangeOf(job: DetectorJob, bins: EnergyBins, group: number, thresholdKeV: number): ValidRange {
  const grid = { minKeV: bins.loKeV[0], maxKeV: bins.hiKeV[bins.hiKeV.length - 1], bins: bins.loKeV.length, spacing: 'linear' as const };
  return validRange(groupedChannels(job.instrument.channels, group), grid, thresholdKeV);
}
const caseValidRange = (job: DetectorJob, choice: CaseChoice): ValidRange => validRangeOf(job, choice.grid.bins, choice.group, choice.region.spec.thresholdKeV);

/** Last observation date (exclusive) of the detector's epochs; null when open-ended. */
const validToOf = (job: DetectorJob): string | null => job.detector.epochs[job.detector.epochs.length - 1].validTo;

/** Channel grid with `group` channels merged into one (group divides the count: checked by the caller). */
export function groupedChannels(c: ChannelGrid, group: number): ChannelGrid {
  return group === 1 ? c : { ...c, count: c.count / group, widthEv: c.widthEv * group };
}

export function rmfHistory(job: DetectorJob, choice: CaseChoice): string[] {
  const lines = ['Redistribution matrix (HDUCLAS3 REDIST)', `Case: ${regionText(job, choice.region)}`, `Case: energies ${choice.grid.text}, channel group ${choice.group}`];
  const t = transferLossOf(choice.region);
  if (t) lines.push(`Transfer loss ${t.law.lossPerTransfer.toExponential(4)}/transfer at ${t.law.referenceKeV} keV, index ${t.law.energyIndex.toFixed(4)}`);
  return lines;
}

/** The input of the region's matrix on the case's grid, in a form another thread can take (response/portable-input.ts). */
export function regionRedistributionInput(job: DetectorJob, choice: CaseChoice, validFrom: string): PortableRedistributionInput {
  const spec = choice.region.spec;
  const sensorFormula = job.detector.stack.sensor.material.formula;
  return {
    spec,
    lineFits: job.detector.lineFits,
    energy: choice.grid.bins,
    channels: groupedChannels(job.instrument.channels, choice.group),
    meta: metaFor(job, { validFrom, validTo: validToOf(job), range: caseValidRange(job, choice), channels: true }, rmfHistory(job, choice)),
    siliconElement: spec.escape || spec.siFluorescenceFraction > 0 || countsStackFluorescence(spec) ? sensorFormula : undefined,
    // the stack: a collection-model tail needs the sensor's partial layer, stack fluorescence its layers
    stack: job.detector.stack,
    file: job.detector.lineFitsFile,
    transferLoss: transferLossOf(choice.region),
  };
}

/** The region's matrix on the case's grid. */
export function regionRedistribution(job: DetectorJob, choice: CaseChoice, validFrom: string, onProgress?: (done: number, total: number) => void): RedistributionResult {
  return buildRedistribution({ ...localInput(regionRedistributionInput(job, choice, validFrom)), onProgress });
}

export interface AreaOnDate {
  arf: ArfData;
  centres: Float64Array;
  mirrorCm2: Float64Array;
  efficiency: EfficiencyBreakdown;
  /** The HISTORY lines of the area (before the model document's). */
  history: string[];
}

/**
 * The effective area on a date (contamination evaluated on that date). At the epoch's reference
 * date the HISTORY reads as the epoch's published product; any other date is named as such.
 */
export function areaOnDate(job: DetectorJob, bins: EnergyBins, gridText: string, epoch: Epoch, dateIso: string): AreaOnDate {
  const spec = job.detector.redistribution;
  const centres = binCentresKeV(bins.loKeV, bins.hiKeV);
  const mirrorCm2 = mirrorAreaAtBinCentres(job.instrument.mirror, bins.loKeV, bins.hiKeV);
  const effOpts = efficiencyOptionsFor(spec);
  // Components are plotted at the bin centres; SPECRESP and the plotted QE are bin averages.
  const centred = efficiencyBreakdown(job.detector.stack, centres, dateIso, effOpts);
  const averaged = effectiveArea(job.detector.stack, job.instrument.mirror, bins.loKeV, bins.hiKeV, dateIso, {
    ...effOpts,
    extraPerIncident: countsStackFluorescence(spec) ? fluorescencePerIncident(job.detector.stack, dateIso) : undefined,
  });
  const eff: EfficiencyBreakdown = { ...centred, detectorQE: averaged.detectorQE };
  const specrespCm2 = averaged.specrespCm2;
  const what =
    dateIso === epoch.date
      ? `Effective area for epoch ${epoch.id} (reference date ${epoch.date}; contamination ${eff.contaminationUm.toFixed(4)} um)`
      : `Effective area on ${dateIso} (epoch ${epoch.id}; contamination ${eff.contaminationUm.toFixed(4)} um)`;
  const history = [what, `Case: detector ${job.detector.id}, date ${dateIso}, energies ${gridText}`];
  const range = validRangeOf(job, bins, 1, spec.thresholdKeV);
  const meta = metaFor(job, { validFrom: epoch.validFrom, validTo: epoch.validTo, range, channels: false }, history);
  return { arf: { meta, energLoKeV: bins.loKeV, energHiKeV: bins.hiKeV, specrespCm2 }, centres, mirrorCm2, efficiency: eff, history };
}

/** The full response: each row of the redistribution scaled by the effective area of its bin. */
export function fullResponse(rmf: RmfData, arf: ArfData, meta: ResponseMeta): RmfData {
  return {
    ...rmf,
    meta,
    hduclas3: 'FULL',
    rows: rmf.rows.map((row, i) => ({ fChan: row.fChan, nChan: row.nChan, matrix: row.matrix.map((v) => v * arf.specrespCm2[i]) })),
  };
}

/** RSP header: the area's lines, the region's case, and what it is. */
export function rspMetaFor(job: DetectorJob, epoch: Epoch, area: AreaOnDate, choice: CaseChoice): ResponseMeta {
  const validity = { validFrom: epoch.validFrom, validTo: epoch.validTo, range: caseValidRange(job, choice), channels: true };
  return metaFor(job, validity, [...area.history, ...rmfHistory(job, choice).slice(1), 'Full response: redistribution x effective area']);
}

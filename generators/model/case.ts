/**
 * One response case from a model document: the RMF of a position (detector, node, row band) and
 * the ARF on an exact date (contamination evaluated on that date), on the model's energy grid or
 * one the observer chose, channels optionally grouped; the RSP on request. Used by `kiln response`
 * and by the site's response page (in a Web Worker); a case equal to a published product gives
 * its bytes. Bad choices name the field, the value and what was allowed. Pure.
 */
import { KilnInputError } from '../errors.ts';
import { writeArf, writeRmf } from '../ogip/index.ts';
import type { EnergyBins } from '../response/grid.ts';
import type { ArfData, RmfData } from '../response/types.ts';
import type { RowLosses } from '../response/redistribution.ts';
import { detectorValidity, modelGrid } from '../pipeline/product.ts';
import { areaOnDate, fullResponse, regionRedistribution, rspMetaFor, type CaseGrid } from './parts.ts';
import { regionAt, type Region } from './regions.ts';
import { jobsFromModel } from './document.ts';
import type { ModelDocument } from './types.ts';

export type EnergyChoice =
  | { kind: 'model' }
  | { kind: 'range'; loKeV: number; hiKeV: number; bins: number }
  | { kind: 'edges'; edgesKeV: number[] };

export interface CaseRequest {
  detector: string;
  node: string | null;
  row: number | null;
  /** Observation date YYYY-MM-DD. */
  date: string;
  energies: EnergyChoice;
  /** Channels merged per output channel; 1 = the model's channels. */
  group: number;
  rsp: boolean;
  /** false: the ARF only (no matrix is built); the build's rebuild check uses it for later epochs. */
  matrix?: boolean;
}

export interface CaseFile {
  kind: 'rmf' | 'arf' | 'rsp';
  name: string;
  fits: Uint8Array;
}

export interface CaseResult {
  files: CaseFile[];
  region: Region;
  epoch: string;
  /** null when only the ARF was asked for. */
  rmf: RmfData | null;
  arf: ArfData;
  losses: RowLosses | null;
}

/** Largest number of energy bins a case may ask for (as the content schema allows). */
export const MAX_CASE_BINS = 100000;
const ISO_DATE_RE = /^\d{4}-\d{2}-\d{2}$/;

const bad = (message: string, field: string, value: unknown, expected: string): never => {
  throw new KilnInputError(message, { field, value, expected });
};

/** The energy range the model's data cover: the interaction table and the mirror-area table. */
export function dataRangeKeV(doc: ModelDocument): { loKeV: number; hiKeV: number } {
  const m = doc.instrument.mirror.energyKeV;
  return { loKeV: Math.max(doc.interaction.energyMinKeV, m[0]), hiKeV: Math.min(doc.interaction.energyMaxKeV, m[m.length - 1]) };
}

function caseGrid(doc: ModelDocument, e: EnergyChoice, modelDefault: () => CaseGrid): CaseGrid {
  if (e.kind === 'model') return modelDefault();
  const range = dataRangeKeV(doc);
  const allowed = `within the model's data range [${range.loKeV}, ${range.hiKeV}] keV`;
  let edges: number[];
  let text: string;
  if (e.kind === 'range') {
    if (!(Number.isInteger(e.bins) && e.bins >= 1 && e.bins <= MAX_CASE_BINS)) bad('energy grid needs a whole number of bins', 'energies', e.bins, `an integer bin count in [1, ${MAX_CASE_BINS}]`);
    if (!(Number.isFinite(e.loKeV) && Number.isFinite(e.hiKeV) && e.hiKeV > e.loKeV)) bad('energy grid is not increasing', 'energies', `${e.loKeV}:${e.hiKeV}`, 'lo:hi:n with hi > lo (keV)');
    edges = Array.from({ length: e.bins + 1 }, (_x, i) => (i === e.bins ? e.hiKeV : e.loKeV + ((e.hiKeV - e.loKeV) * i) / e.bins));
    text = `${e.loKeV}-${e.hiKeV} keV, ${e.bins} linear bins`;
  } else {
    edges = e.edgesKeV;
    if (!(edges.length >= 2 && edges.length <= MAX_CASE_BINS + 1)) bad('energy grid needs at least two edges', 'energy-grid', edges.length, `2 to ${MAX_CASE_BINS + 1} bin edges (keV)`);
    for (let i = 0; i < edges.length; i++) {
      if (!Number.isFinite(edges[i])) bad('energy grid edge is not a number', 'energy-grid', `edge ${i + 1}: ${edges[i]}`, 'finite energies in keV');
      if (i > 0 && !(edges[i] > edges[i - 1])) bad('energy grid is not increasing', 'energy-grid', `edge ${i + 1}: ${edges[i]} after ${edges[i - 1]}`, 'strictly increasing edges (keV)');
    }
    text = `${edges.length - 1} bins ${edges[0]}-${edges[edges.length - 1]} keV from a list of edges`;
  }
  const lo = edges[0];
  const hi = edges[edges.length - 1];
  if (lo < range.loKeV || hi > range.hiKeV) bad("energy grid leaves the model's data range", e.kind === 'range' ? 'energies' : 'energy-grid', `${lo}-${hi} keV`, allowed);
  const bins: EnergyBins = { loKeV: Float64Array.from(edges.slice(0, -1)), hiKeV: Float64Array.from(edges.slice(1)) };
  return { bins, text };
}

const fileStem = (doc: ModelDocument, label: string, date: string) => `${doc.instrument.id}_${label}_${date}_${doc.release.id}`;

export function buildCase(doc: ModelDocument, modelSha256: string, req: CaseRequest, onProgress?: (done: number, total: number) => void): CaseResult {
  const jobs = jobsFromModel(doc, modelSha256);
  const job = jobs.find((j) => j.detector.id === req.detector);
  if (!job) return bad(`no detector "${req.detector}" in release ${doc.release.id}`, 'detector', req.detector, `one of ${jobs.map((j) => j.detector.id).join(', ')}`);
  const region = regionAt(job.detector, req.node, req.row);
  const r = doc.release;
  if (!ISO_DATE_RE.test(req.date)) bad('not a date', 'date', req.date, 'an ISO date YYYY-MM-DD');
  const eps = job.detector.epochs;
  const epoch = eps.find((e) => e.validFrom <= req.date && (e.validTo === null || req.date < e.validTo));
  if (!epoch || req.date < r.validFrom || (r.validTo !== null && req.date >= r.validTo))
    bad(`date outside the validity of release ${r.id} for detector ${job.detector.id}`, 'date', req.date, `a date in [${eps[0].validFrom}, ${eps[eps.length - 1].validTo ?? 'open'})`);
  const channels = doc.instrument.channels.count;
  if (!(Number.isInteger(req.group) && req.group >= 1 && channels % req.group === 0))
    bad('channel grouping does not divide the channels', 'group', req.group, `a divisor of ${channels} channels (1, 2, 4, …)`);
  const grid = caseGrid(doc, req.energies, () => modelGrid(job));
  const choice = { region, grid, group: req.group };
  const area = areaOnDate(job, grid.bins, grid.text, epoch!, req.date);
  const stem = fileStem(doc, region.label, req.date);
  const arfFile: CaseFile = { kind: 'arf', name: `${stem}.arf`, fits: writeArf(area.arf) };
  if (req.matrix === false) return { files: [arfFile], region, epoch: epoch!.id, rmf: null, arf: area.arf, losses: null };
  const red = regionRedistribution(job, choice, detectorValidity(job).validFrom, onProgress);
  const files: CaseFile[] = [{ kind: 'rmf', name: `${stem}.rmf`, fits: writeRmf(red.rmf) }, arfFile];
  if (req.rsp) files.push({ kind: 'rsp', name: `${stem}.rsp`, fits: writeRmf(fullResponse(red.rmf, area.arf, rspMetaFor(job, epoch!, area, choice))) });
  return { files, region, epoch: epoch!.id, rmf: red.rmf, arf: area.arf, losses: red.losses };
}

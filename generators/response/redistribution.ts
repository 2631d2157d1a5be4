/**
 * Builds the redistribution matrix: for each true-energy bin, the probability of each channel as
 * differences of the profile CDF at the channel boundaries (one CDF evaluation per boundary and
 * component). Each component is evaluated only inside its window (±8σ for Gaussians; the tail's
 * exponential down to 36 e-foldings; the shelf's linear middle in closed form); outside it the CDF
 * is exactly 0 or 1, so the row telescopes and
 *   Σ row + thresholdLoss + outsideLoss + droppedByCut = 1
 * holds to rounding. When the centroid moves by more than a quarter σ across an energy bin the row
 * is averaged over the bin (composite 2-point Gauss–Legendre, sub-intervals ≤ σ/2 of centroid
 * motion), i.e. the matrix is for a spectrum flat within each bin.
 */
import type { ResponseMeta, RmfData, RmfRow } from './types.ts';
import type { ChannelGrid, EnergyGridSpec, LineFit, RedistributionSpec } from './model-types.ts';
import type { EscapeInputs } from '../physics/escape.ts';
import { componentCdf, componentWindow, mergeCoreAndTail, profileComponents, WINDOW_SIGMAS, type ProfileComponent, type ProfileContext } from '../physics/profile.ts';
import { buildParamsAt, type ParamsAt } from './params.ts';
import type { DetectorStack } from '../physics/types.ts';
import { fluorescenceShareFn } from './fluorescence-share.ts';
import { efficiencyOptionsFor } from './collection-options.ts';
import { channelBoundsKeV, checkEnergyBins, energyGrid, type EnergyBins } from './grid.ts';
import { eboundsFromChannels } from './ebounds.ts';
import { compressRow, cutForBudget, DEFAULT_DROP_BUDGET } from './compress.ts';
import { KilnInputError } from '../errors.ts';
import { lostFraction, lossPerTransferAt, meanTransfers, transferVarianceKeV2, type TransferBand, type TransferLossLaw } from '../physics/transfer-loss.ts';

/** Sub-sample an energy bin when the centroid moves by more than this many σ across it. */
export const SUBSAMPLE_SIGMAS = 0.25;
/** Width (in σ of centroid motion) of each Gauss–Legendre sub-interval. */
export const SUBINTERVAL_SIGMAS = 0.5;
/** Cap on sub-intervals per bin (coarse bins over very narrow lines). */
export const MAX_SUBINTERVALS = 256;
/** 2-point Gauss–Legendre nodes on [−1, 1] are ±1/√3 with equal weights (Abramowitz & Stegun 25.4.29). */
const GL2_NODE = 1 / Math.sqrt(3);

export interface RedistributionInput {
  spec: RedistributionSpec;
  lineFits: readonly LineFit[];
  energy: EnergyGridSpec | EnergyBins;
  channels: ChannelGrid;
  meta: ResponseMeta;
  /** Silicon atomic data (ω_K, J, Kα, K edge, μ(E)); required with the escape peak or Si fluorescence. */
  silicon?: EscapeInputs;
  /** The detector stack; required for tail 'collection' and siFluorescenceSource 'stack'. */
  stack?: DetectorStack;
  /** Element cut (LO_THRES). Default: dropBudget / channel count, which bounds each row's dropped sum by dropBudget. */
  cut?: number;
  /** Per-row dropped-probability budget used for the default cut (1e-5). */
  dropBudget?: number;
  file?: string;
  /** Charge lost in transfer over a band of transfer counts (physics/transfer-loss.ts); absent = none. */
  transferLoss?: { law: TransferLossLaw; band: TransferBand } | null;
  /** Called after every PROGRESS_ROWS rows and at the end with (rows done, rows): progress for a page. */
  onProgress?: (done: number, total: number) => void;
}

/** Rows between progress reports. */
const PROGRESS_ROWS = 32;

/** Per-row accounting of probability not in the stored row. */
export interface RowLosses {
  /** Events measured below the event threshold. */
  thresholdLoss: Float64Array;
  /** Events measured below the lowest or above the highest channel (and above the threshold). */
  outsideLoss: Float64Array;
  /** Probability of the elements dropped by the cut. */
  droppedByCut: Float64Array;
}

export interface RedistributionResult {
  rmf: RmfData;
  losses: RowLosses;
  /** Stored matrix elements. */
  nnz: number;
}

export interface RowContext {
  bounds: Float64Array;
  widthKeV: number;
  thresholdKeV: number;
}

/** Adds `mass` × component to prob; returns nothing, accumulates losses into acc[0] (threshold), acc[1] (outside). */
function addComponent(prob: Float64Array, rc: RowContext, comp: ProfileComponent, mass: number, acc: Float64Array): void {
  const { bounds, widthKeV, thresholdKeV: thr } = rc;
  const n = bounds.length - 1;
  const b0 = bounds[0];
  const bN = bounds[n];
  const G = componentCdf(comp);
  const L = thr > b0 ? thr : b0;
  const gL = G(L);
  const gN = G(bN);
  if (thr > b0) acc[0] += mass * gL;
  else acc[1] += mass * gL;
  acc[1] += mass * (1 - gN);
  const [lo, hi] = componentWindow(comp);
  const xa = Math.max(lo, L);
  const xb = Math.min(hi, bN);
  if (!(xb > xa)) return;
  // one channel of margin each side against rounding in the index arithmetic
  const ja = Math.max(0, Math.floor((xa - b0) / widthKeV) - 1);
  const jb = Math.min(n - 1, Math.floor((xb - b0) / widthKeV) + 1);
  let prev = G(bounds[ja] > thr ? bounds[ja] : thr);
  if (comp.kind === 'shelf') {
    // The shelf spans most of the row; in its flat middle its CDF is (x − low)/width (the same
    // expression shelfCdf uses there), evaluated inline rather than through the closure.
    const lo = comp.lowKeV;
    const width = comp.highKeV - comp.lowKeV;
    const linLo = lo + WINDOW_SIGMAS * comp.sigmaKeV;
    const linHi = comp.highKeV - WINDOW_SIGMAS * comp.sigmaKeV;
    const exact = width > 1e-9 * comp.sigmaKeV;
    for (let j = ja; j <= jb; j++) {
      const x = bounds[j + 1];
      const xe = x > thr ? x : thr;
      const next = exact && xe >= linLo && xe <= linHi ? (xe - lo) / width : G(xe);
      prob[j] += mass * (next - prev);
      prev = next;
    }
    return;
  }
  for (let j = ja; j <= jb; j++) {
    const x = bounds[j + 1];
    const next = G(x > thr ? x : thr);
    prob[j] += mass * (next - prev);
    prev = next;
  }
}

function nodesFor(loKeV: number, hiKeV: number, paramsAt: ParamsAt): { e: Float64Array; w: Float64Array } {
  const pLo = paramsAt(loKeV);
  const pHi = paramsAt(hiKeV);
  const motion = Math.abs(pHi.centroidKeV - pLo.centroidKeV);
  const sigma = Math.min(pLo.sigmaKeV, pHi.sigmaKeV);
  if (motion <= SUBSAMPLE_SIGMAS * sigma) return { e: Float64Array.of(0.5 * (loKeV + hiKeV)), w: Float64Array.of(1) };
  const m = Math.min(MAX_SUBINTERVALS, Math.ceil(motion / (SUBINTERVAL_SIGMAS * sigma)));
  const e = new Float64Array(2 * m);
  const w = new Float64Array(2 * m).fill(1 / (2 * m));
  const h = (hiKeV - loKeV) / m;
  for (let i = 0; i < m; i++) {
    const mid = loKeV + (i + 0.5) * h;
    e[2 * i] = mid - 0.5 * h * GL2_NODE;
    e[2 * i + 1] = mid + 0.5 * h * GL2_NODE;
  }
  return { e, w };
}

/**
 * The profile after transfer: the centroid moves down by the charge lost at the band's mean
 * transfer count, and the loss's variance adds to σ² (formulas and sources in physics/transfer-loss.ts).
 */
export function withTransferLoss(paramsAt: ParamsAt, t: { law: TransferLossLaw; band: TransferBand } | null, pairEnergyEv: number): ParamsAt {
  if (!t || t.law.lossPerTransfer === 0) return paramsAt;
  const n = meanTransfers(t.band);
  const moved = (e: number, centroidKeV: number, sigmaKeV: number) => {
    const kept = 1 - lostFraction(lossPerTransferAt(t.law, e), n);
    const variance = transferVarianceKeV2(t.law, e, centroidKeV, t.band, pairEnergyEv);
    return { centroidKeV: centroidKeV * kept, sigmaKeV: Math.sqrt(sigmaKeV * sigmaKeV + variance) };
  };
  const wrapped: ParamsAt = (e) => {
    const p = paramsAt(e);
    return { ...p, ...moved(e, p.centroidKeV, p.sigmaKeV) };
  };
  // The escape event's charge (about E − Kα, with the parent's surface loss) is transferred too.
  const escapeAt = paramsAt.escapeAt;
  if (escapeAt)
    wrapped.escapeAt = (e) => {
      const q = escapeAt(e);
      return moved(q.centroidKeV, q.centroidKeV, q.sigmaKeV);
    };
  return wrapped;
}

/**
 * Everything the rows of one matrix need, resolved once from the input: checked grids, the
 * profile laws, the cut. Holds functions (the laws), so each thread prepares its own.
 */
export interface PreparedRedistribution {
  bins: EnergyBins;
  channels: ChannelGrid;
  cut: number;
  meta: ResponseMeta;
  paramsAt: ParamsAt;
  rc: RowContext;
  fluoCtx: ProfileContext['fluorescence'];
}

/** Rows [i0, i1) of a matrix: their grouped form and their losses (index 0 = row i0). */
export interface RowBlock {
  rows: RmfRow[];
  losses: RowLosses;
}

/** Checks the input and resolves what every row needs. Throws KilnInputError on bad grids or parameters. */
export function prepareRedistribution(input: Omit<RedistributionInput, 'onProgress'>): PreparedRedistribution {
  const { spec, channels, silicon, file } = input;
  const bins = 'loKeV' in input.energy ? checkEnergyBins(input.energy, 'energyBins', file) : energyGrid(input.energy, 'energyGrid', file);
  const bounds = channelBoundsKeV(channels, 'channels', file);
  const stack = input.stack;
  const paramsAt = withTransferLoss(
    buildParamsAt(spec, input.lineFits, {
      silicon,
      file,
      sensor: stack?.sensor,
      fluorescenceShare: spec.siFluorescenceSource === 'stack' && stack ? fluorescenceShareFn(stack, efficiencyOptionsFor(spec)) : undefined,
    }),
    input.transferLoss ?? null,
    spec.pairEnergyEv,
  );
  const budget = input.dropBudget ?? DEFAULT_DROP_BUDGET;
  const cut = input.cut ?? cutForBudget(channels.count, budget);
  if (!(cut >= 0 && cut < 1)) throw new KilnInputError('matrix element cut out of range', { file, field: 'cut', value: cut, expected: 'in [0, 1)' });
  const rc: RowContext = { bounds, widthKeV: channels.widthEv / 1000, thresholdKeV: spec.thresholdKeV };

  let fluoCtx: ProfileContext['fluorescence'];
  if (silicon && (spec.siFluorescenceFraction > 0 || spec.siFluorescenceSource === 'stack')) {
    const pf = paramsAt(silicon.kAlphaKeV);
    fluoCtx = { centroidKeV: pf.centroidKeV, sigmaKeV: pf.sigmaKeV };
  }
  return { bins, channels, cut, meta: input.meta, paramsAt, rc, fluoCtx };
}

/**
 * Rows [i0, i1) of the matrix. A row depends on its own energy bin only (nothing carries from one
 * row to the next), so rows computed in any split, in any thread, are the rows of the whole.
 * onProgress gets (rows done in this block, rows in this block) every PROGRESS_ROWS rows and at the end.
 */
export function redistributionRows(p: PreparedRedistribution, i0: number, i1: number, onProgress?: (done: number, total: number) => void): RowBlock {
  const { bins, channels, cut, paramsAt, rc, fluoCtx } = p;
  const nE = bins.loKeV.length;
  if (!(Number.isInteger(i0) && Number.isInteger(i1) && 0 <= i0 && i0 <= i1 && i1 <= nE)) throw new RangeError(`rows [${i0}, ${i1}) outside the matrix's ${nE} rows`);
  const count = i1 - i0;
  const bounds = rc.bounds;
  const rows: RmfRow[] = new Array(count);
  const losses: RowLosses = { thresholdLoss: new Float64Array(count), outsideLoss: new Float64Array(count), droppedByCut: new Float64Array(count) };
  const prob = new Float64Array(channels.count);
  const acc = new Float64Array(2);
  for (let r = 0; r < count; r++) {
    const i = i0 + r;
    prob.fill(0);
    acc.fill(0);
    const { e, w } = nodesFor(bins.loKeV[i], bins.hiKeV[i], paramsAt);
    for (let k = 0; k < e.length; k++) {
      const q = paramsAt(e[k]);
      const ctx: ProfileContext = { shelfLowKeV: bounds[0], fluorescence: fluoCtx };
      if (q.escapeFraction > 0 && paramsAt.escapeAt) ctx.escape = paramsAt.escapeAt(e[k]);
      for (const c of mergeCoreAndTail(profileComponents(q, ctx, e[k]))) addComponent(prob, rc, c, w[k] * c.fraction, acc);
    }
    const { row, dropped } = compressRow(prob, cut, channels.firstChannel);
    rows[r] = row;
    losses.thresholdLoss[r] = acc[0];
    losses.outsideLoss[r] = acc[1];
    losses.droppedByCut[r] = dropped;
    if (onProgress && ((r + 1) % PROGRESS_ROWS === 0 || r + 1 === count)) onProgress(r + 1, count);
  }
  return { rows, losses };
}

/** The matrix from its row blocks, given in row order and covering every row once. */
export function assembleRedistribution(p: PreparedRedistribution, blocks: readonly RowBlock[]): RedistributionResult {
  const nE = p.bins.loKeV.length;
  const total = blocks.reduce((s, b) => s + b.rows.length, 0);
  if (total !== nE) throw new RangeError(`row blocks hold ${total} rows; the matrix has ${nE}`);
  const single = blocks.length === 1;
  const rows: RmfRow[] = single ? blocks[0].rows : new Array(nE);
  const losses: RowLosses = single ? blocks[0].losses : { thresholdLoss: new Float64Array(nE), outsideLoss: new Float64Array(nE), droppedByCut: new Float64Array(nE) };
  let at = 0;
  let nnz = 0;
  for (const b of blocks) {
    if (!single) {
      for (let r = 0; r < b.rows.length; r++) rows[at + r] = b.rows[r];
      losses.thresholdLoss.set(b.losses.thresholdLoss, at);
      losses.outsideLoss.set(b.losses.outsideLoss, at);
      losses.droppedByCut.set(b.losses.droppedByCut, at);
    }
    for (const row of b.rows) nnz += row.matrix.length;
    at += b.rows.length;
  }
  const { channels } = p;
  const rmf: RmfData = {
    meta: p.meta,
    hduclas3: 'REDIST',
    detchans: channels.count,
    firstChannel: channels.firstChannel,
    loThres: p.cut,
    energLoKeV: p.bins.loKeV,
    energHiKeV: p.bins.hiKeV,
    rows,
    ebounds: eboundsFromChannels(channels),
  };
  return { rmf, losses, nnz };
}

/** Builds the matrix and its loss report in this thread. Throws KilnInputError on bad grids or parameters. */
export function buildRedistribution(input: RedistributionInput): RedistributionResult {
  const p = prepareRedistribution(input);
  return assembleRedistribution(p, [redistributionRows(p, 0, p.bins.loKeV.length, input.onProgress)]);
}

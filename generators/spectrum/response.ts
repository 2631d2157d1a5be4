/**
 * A folding response: an RMF (and the ARF that goes with it, unless the matrix is a full
 * response) checked to belong together and flattened for fast folding.
 */
import { KilnInputError } from '../errors.ts';
import type { ArfData, RmfData } from '../response/types.ts';

export interface FoldingResponse {
  energLoKeV: Float64Array;
  energHiKeV: Float64Array;
  /** Effective area per energy bin, cm² (the ARF's, or 1 when the matrix includes it). */
  areaCm2: Float64Array;
  detchans: number;
  firstChannel: number;
  /** Channel bounds from EBOUNDS, keV. */
  channelLoKeV: Float64Array;
  channelHiKeV: Float64Array;
  /**
   * Row r's groups are rowGroup[r]..rowGroup[r+1]; group g holds groupLength[g] elements from
   * value[groupOffset[g]] for channel indices (0-based) groupChannel[g] onwards.
   */
  rowGroup: Int32Array;
  groupChannel: Int32Array;
  groupLength: Int32Array;
  groupOffset: Int32Array;
  value: Float32Array;
  /** Σ of each row's elements (the probability the photon is detected in some channel). */
  rowSum: Float64Array;
  /** Identity of the response (for messages and for matching a spectrum). */
  telescop: string;
  instrume: string;
  detnam: string | null;
  filter: string;
  chantype: 'PI' | 'PHA';
}

/** Relative mismatch of RMF and ARF energy bounds tolerated (single-precision E columns, FITS 4.0 §7.3). */
const GRID_MATCH_REL = 1e-6;

export interface ResponseFiles {
  rmf: RmfData;
  rmfName: string;
  arf: ArfData | null;
  arfName: string | null;
}

function same(a: string | undefined, b: string | undefined): boolean {
  return (a ?? '').trim().toUpperCase() === (b ?? '').trim().toUpperCase();
}

export function foldingResponse(f: ResponseFiles): FoldingResponse {
  const { rmf, arf } = f;
  const n = rmf.energLoKeV.length;
  if (n === 0) throw new KilnInputError('response has no energy bins', { file: f.rmfName, field: 'MATRIX', expected: 'at least one row' });
  if (rmf.ebounds.eMinKeV.length !== rmf.detchans)
    throw new KilnInputError('EBOUNDS does not list every channel', { file: f.rmfName, field: 'EBOUNDS', value: rmf.ebounds.eMinKeV.length, expected: `${rmf.detchans} rows (DETCHANS)` });
  const area = new Float64Array(n).fill(1);
  if (arf) {
    if (rmf.hduclas3 === 'FULL')
      throw new KilnInputError('an ARF was given with a full response (effective area already in the matrix)', { file: f.arfName ?? undefined, field: 'HDUCLAS3', value: 'FULL', expected: 'no ARF, or an RMF with HDUCLAS3 REDIST' });
    if (arf.energLoKeV.length !== n)
      throw new KilnInputError('ARF and RMF have different energy grids', { file: f.arfName ?? undefined, field: 'SPECRESP', value: `${arf.energLoKeV.length} bins`, expected: `${n} bins, as in ${f.rmfName}` });
    for (let i = 0; i < n; i++) {
      const tol = GRID_MATCH_REL * rmf.energHiKeV[i];
      if (Math.abs(arf.energLoKeV[i] - rmf.energLoKeV[i]) > tol || Math.abs(arf.energHiKeV[i] - rmf.energHiKeV[i]) > tol)
        throw new KilnInputError('ARF and RMF have different energy grids', { file: f.arfName ?? undefined, field: `ENERG_LO/ENERG_HI row ${i + 1}`, value: `${arf.energLoKeV[i]}–${arf.energHiKeV[i]} keV`, expected: `${rmf.energLoKeV[i]}–${rmf.energHiKeV[i]} keV, as in ${f.rmfName}` });
    }
    // Products of different detectors must not be mixed: DETNAM (when both have it) and INSTRUME must agree.
    if (!same(arf.meta.instrume, rmf.meta.instrume) || (arf.meta.detnam !== undefined && rmf.meta.detnam !== undefined && !same(arf.meta.detnam, rmf.meta.detnam)))
      throw new KilnInputError('ARF and RMF belong to different detectors', { file: f.arfName ?? undefined, field: 'DETNAM', value: `${arf.meta.instrume}/${arf.meta.detnam ?? ''}`, expected: `${rmf.meta.instrume}/${rmf.meta.detnam ?? ''}, as in ${f.rmfName}` });
    area.set(arf.specrespCm2);
  } else if (rmf.hduclas3 !== 'FULL') {
    throw new KilnInputError('no ARF for a redistribution-only matrix', { file: f.rmfName, field: 'HDUCLAS3', value: rmf.hduclas3, expected: 'an ARF (or a matrix with HDUCLAS3 FULL)' });
  }
  let nnz = 0;
  let groups = 0;
  for (const row of rmf.rows) {
    nnz += row.matrix.length;
    groups += row.fChan.length;
  }
  const rowGroup = new Int32Array(n + 1);
  const groupChannel = new Int32Array(groups);
  const groupLength = new Int32Array(groups);
  const groupOffset = new Int32Array(groups);
  const value = new Float32Array(nnz);
  const rowSum = new Float64Array(n);
  let k = 0;
  let gi = 0;
  for (let i = 0; i < n; i++) {
    rowGroup[i] = gi;
    const row = rmf.rows[i];
    let m = 0;
    let s = 0;
    for (let g = 0; g < row.fChan.length; g++, gi++) {
      const c0 = row.fChan[g] - rmf.firstChannel;
      const len = row.nChan[g];
      if (c0 < 0 || len < 0 || c0 + len > rmf.detchans || m + len > row.matrix.length)
        throw new KilnInputError('matrix group outside the channel range', { file: f.rmfName, field: `MATRIX row ${i + 1}`, value: `F_CHAN ${row.fChan[g]}, N_CHAN ${len}`, expected: `channels ${rmf.firstChannel}..${rmf.firstChannel + rmf.detchans - 1}` });
      groupChannel[gi] = c0;
      groupLength[gi] = len;
      groupOffset[gi] = k;
      for (let j = 0; j < len; j++, m++, k++) {
        value[k] = row.matrix[m];
        s += row.matrix[m];
      }
    }
    rowSum[i] = s;
  }
  rowGroup[n] = gi;
  return {
    energLoKeV: rmf.energLoKeV,
    energHiKeV: rmf.energHiKeV,
    areaCm2: area,
    detchans: rmf.detchans,
    firstChannel: rmf.firstChannel,
    channelLoKeV: rmf.ebounds.eMinKeV,
    channelHiKeV: rmf.ebounds.eMaxKeV,
    rowGroup,
    groupChannel,
    groupLength,
    groupOffset,
    value,
    rowSum,
    telescop: rmf.meta.telescop,
    instrume: rmf.meta.instrume,
    detnam: rmf.meta.detnam ?? null,
    filter: rmf.meta.filter,
    chantype: rmf.meta.chantype === 'PHA' ? 'PHA' : 'PI',
  };
}

/**
 * OGIP grouped storage of one matrix row (CAL/GEN/92-002: N_GRP, F_CHAN, N_CHAN, MATRIX): runs of
 * consecutive channels whose probability is ≥ the cut; elements below the cut are dropped and
 * their summed probability is reported, so nothing disappears silently.
 */
import type { RmfRow } from './types.ts';

export interface CompressedRow {
  row: RmfRow;
  /** Sum of the dropped elements (in double precision, before Float32 rounding). */
  dropped: number;
}

/** Default per-row budget for dropped probability. */
export const DEFAULT_DROP_BUDGET = 1e-5;

/**
 * A cut that cannot drop more than `budget` from any row of `detchans` channels: every dropped
 * element is < cut, so at most detchans·cut in total.
 */
export function cutForBudget(detchans: number, budget = DEFAULT_DROP_BUDGET): number {
  return budget / detchans;
}

/** Groups prob[j] (channel firstChannel + j) into runs ≥ cut. */
export function compressRow(prob: Float64Array, cut: number, firstChannel: number): CompressedRow {
  const n = prob.length;
  let dropped = 0;
  let kept = 0;
  let groups = 0;
  let inRun = false;
  for (let j = 0; j < n; j++) {
    const v = prob[j];
    if (v >= cut && v > 0) {
      kept++;
      if (!inRun) groups++;
      inRun = true;
    } else {
      dropped += v;
      inRun = false;
    }
  }
  const fChan = new Int32Array(groups);
  const nChan = new Int32Array(groups);
  const matrix = new Float32Array(kept);
  let g = -1;
  let k = 0;
  inRun = false;
  for (let j = 0; j < n; j++) {
    const v = prob[j];
    if (v >= cut && v > 0) {
      if (!inRun) {
        g++;
        fChan[g] = firstChannel + j;
      }
      nChan[g]++;
      matrix[k++] = v;
      inRun = true;
    } else inRun = false;
  }
  return { row: { fChan, nChan, matrix }, dropped };
}

/**
 * The dense row (index 0 = firstChannel) from its grouped form. Tolerant of rows read from files
 * Kiln did not write: elements outside the channel range are left out, overlapping groups add.
 */
export function expandRow(row: RmfRow, detchans: number, firstChannel: number): Float64Array {
  const out = new Float64Array(detchans);
  let k = 0;
  for (let g = 0; g < row.fChan.length; g++) {
    const start = row.fChan[g] - firstChannel;
    for (let i = 0; i < row.nChan[g]; i++, k++) {
      const idx = start + i;
      if (idx >= 0 && idx < detchans) out[idx] += row.matrix[k];
    }
  }
  return out;
}

/** Number of stored elements of a matrix. */
export function countElements(rows: readonly RmfRow[]): number {
  let n = 0;
  for (const r of rows) n += r.matrix.length;
  return n;
}

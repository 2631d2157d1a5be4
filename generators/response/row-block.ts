/**
 * A block of matrix rows packed into a few flat typed arrays, so a thread can hand its rows over
 * as transferable buffers (no copy on the way) instead of three small arrays per row. Unpacking
 * gives rows that are views into those buffers: the same values, so the same FITS bytes.
 */
import type { RowBlock } from './redistribution.ts';
import type { RmfRow } from './types.ts';

export interface PackedRows {
  /** Groups of each row, and stored elements of each row. */
  groupsPerRow: Int32Array;
  elementsPerRow: Int32Array;
  /** Every row's F_CHAN and N_CHAN, row after row; every row's MATRIX elements, row after row. */
  fChan: Int32Array;
  nChan: Int32Array;
  matrix: Float32Array;
  thresholdLoss: Float64Array;
  outsideLoss: Float64Array;
  droppedByCut: Float64Array;
}

export function packRows(block: RowBlock): PackedRows {
  const { rows, losses } = block;
  const groupsPerRow = new Int32Array(rows.length);
  const elementsPerRow = new Int32Array(rows.length);
  let groups = 0;
  let elements = 0;
  rows.forEach((r, i) => {
    groupsPerRow[i] = r.fChan.length;
    elementsPerRow[i] = r.matrix.length;
    groups += r.fChan.length;
    elements += r.matrix.length;
  });
  const fChan = new Int32Array(groups);
  const nChan = new Int32Array(groups);
  const matrix = new Float32Array(elements);
  let g = 0;
  let k = 0;
  for (const r of rows) {
    fChan.set(r.fChan, g);
    nChan.set(r.nChan, g);
    matrix.set(r.matrix, k);
    g += r.fChan.length;
    k += r.matrix.length;
  }
  return { groupsPerRow, elementsPerRow, fChan, nChan, matrix, ...losses };
}

/** The buffers to transfer with a packed block (each array owns its whole buffer). */
export function packedBuffers(p: PackedRows): ArrayBuffer[] {
  return [p.groupsPerRow, p.elementsPerRow, p.fChan, p.nChan, p.matrix, p.thresholdLoss, p.outsideLoss, p.droppedByCut].map((a) => a.buffer as ArrayBuffer);
}

/** The rows of a packed block, as views into its arrays. Throws when the counts do not add up. */
export function unpackRows(p: PackedRows): RowBlock {
  const n = p.groupsPerRow.length;
  const rows: RmfRow[] = new Array(n);
  let g = 0;
  let k = 0;
  for (let i = 0; i < n; i++) {
    const ng = p.groupsPerRow[i];
    const ne = p.elementsPerRow[i];
    rows[i] = { fChan: p.fChan.subarray(g, g + ng), nChan: p.nChan.subarray(g, g + ng), matrix: p.matrix.subarray(k, k + ne) };
    g += ng;
    k += ne;
  }
  const lossLengths = [p.elementsPerRow.length, p.thresholdLoss.length, p.outsideLoss.length, p.droppedByCut.length];
  if (g !== p.fChan.length || g !== p.nChan.length || k !== p.matrix.length || lossLengths.some((l) => l !== n))
    throw new RangeError(`packed rows do not add up: ${n} rows, ${g} of ${p.fChan.length} groups, ${k} of ${p.matrix.length} elements`);
  return { rows, losses: { thresholdLoss: p.thresholdLoss, outsideLoss: p.outsideLoss, droppedByCut: p.droppedByCut } };
}

/** Reading products at an arbitrary energy: bracketing rows and linear interpolation between bin centres. */
import { expandRow } from '../response/compress.ts';
import type { ArfData, RmfData } from '../response/types.ts';

export interface Bracket {
  /** Indices of the two bins whose centres bracket the energy (equal when clamped at an end). */
  i0: number;
  i1: number;
  /** Weight of i1 (0 → all i0). */
  t: number;
}

/** Bracketing bins of a grid given by lo/hi edges, by bin centre. */
export function bracket(loKeV: Float64Array, hiKeV: Float64Array, energyKeV: number): Bracket {
  const n = loKeV.length;
  const mid = (i: number) => 0.5 * (loKeV[i] + hiKeV[i]);
  if (n === 0) throw new RangeError('empty energy grid');
  if (energyKeV <= mid(0)) return { i0: 0, i1: 0, t: 0 };
  if (energyKeV >= mid(n - 1)) return { i0: n - 1, i1: n - 1, t: 0 };
  let a = 0;
  let b = n - 1;
  while (b - a > 1) {
    const m = (a + b) >> 1;
    if (mid(m) <= energyKeV) a = m;
    else b = m;
  }
  return { i0: a, i1: b, t: (energyKeV - mid(a)) / (mid(b) - mid(a)) };
}

export function lerpAt(values: ArrayLike<number>, b: Bracket): number {
  return values[b.i0] * (1 - b.t) + values[b.i1] * b.t;
}

/** Effective area (cm²) at an energy, linear between bin centres, clamped at the ends. */
export function arfAt(arf: ArfData, energyKeV: number): number {
  return lerpAt(arf.specrespCm2, bracket(arf.energLoKeV, arf.energHiKeV, energyKeV));
}

/** Row i of the matrix as a dense array over channels (index = channel − firstChannel). */
export function denseRow(rmf: RmfData, i: number): Float64Array {
  return expandRow(rmf.rows[i], rmf.detchans, rmf.firstChannel);
}

/**
 * Checks of an energy grid (ENERG_LO/ENERG_HI of an RMF or ARF): finite, positive, each bin
 * increasing, bins in increasing order and contiguous. OGIP CAL/GEN/92-002 (memory) describes the
 * grid as a set of contiguous, increasing bins; readers interpolate across it, so a gap or an
 * overlap silently shifts the response.
 */
import { fmt, makeCheck } from './make-check.ts';
import { GRID_CONTIGUITY_REL } from './tolerances.ts';
import type { Check } from './types.ts';

export function checkEnergyGrid(idPrefix: string, lo: Float64Array, hi: Float64Array, product: string | null): Check[] {
  const n = lo.length;
  const out: Check[] = [];
  if (hi.length !== n || n === 0) {
    out.push(
      makeCheck('fail', {
        id: `${idPrefix}.grid.shape`,
        title: 'energy grid has bins',
        product,
        measured: `${n} ENERG_LO, ${hi.length} ENERG_HI`,
        tolerance: 'equal, > 0',
        message: `energy grid is empty or ENERG_LO/ENERG_HI differ in length (${n} vs ${hi.length})`,
      }),
    );
    return out;
  }
  let badFinite = -1;
  let badPositive = -1;
  let firstZero = false;
  let badOrder = -1;
  let worstGapRel = 0;
  let worstGapAt = -1;
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(lo[i]) || !Number.isFinite(hi[i])) {
      if (badFinite < 0) badFinite = i;
      continue;
    }
    if (lo[i] < 0 || hi[i] <= 0) {
      if (badPositive < 0) badPositive = i;
    } else if (lo[i] === 0) {
      if (i === 0) firstZero = true;
      else if (badPositive < 0) badPositive = i;
    }
    if (!(hi[i] > lo[i]) || (i > 0 && !(lo[i] > lo[i - 1]))) {
      if (badOrder < 0) badOrder = i;
    }
    if (i + 1 < n && Number.isFinite(lo[i + 1])) {
      const rel = Math.abs(hi[i] - lo[i + 1]) / Math.max(Math.abs(hi[i]), Number.MIN_VALUE);
      if (rel > worstGapRel) {
        worstGapRel = rel;
        worstGapAt = i;
      }
    }
  }
  out.push(
    makeCheck(badFinite < 0 ? 'pass' : 'fail', {
      id: `${idPrefix}.grid.finite`,
      title: 'energy grid values finite',
      product,
      measured: badFinite < 0 ? null : `bin ${badFinite}`,
      message: badFinite < 0 ? `${n} bins, all finite` : `ENERG_LO/ENERG_HI not finite in bin ${badFinite} (0-based row)`,
    }),
  );
  out.push(
    makeCheck(badPositive >= 0 ? 'fail' : firstZero ? 'warn' : 'pass', {
      id: `${idPrefix}.grid.positive`,
      title: 'energies positive',
      product,
      measured: badPositive >= 0 ? `bin ${badPositive}: ${fmt(lo[badPositive])}–${fmt(hi[badPositive])}` : fmt(lo[0]),
      tolerance: '> 0',
      unit: 'keV',
      message:
        badPositive >= 0
          ? `energy ≤ 0 in bin ${badPositive} (ENERG_LO ${fmt(lo[badPositive])}, ENERG_HI ${fmt(hi[badPositive])} keV)`
          : firstZero
            ? 'first ENERG_LO is 0 keV; some readers divide by the energy and reject it'
            : `lowest energy ${fmt(lo[0])} keV`,
    }),
  );
  out.push(
    makeCheck(badOrder < 0 ? 'pass' : 'fail', {
      id: `${idPrefix}.grid.monotonic`,
      title: 'energy bins increasing',
      product,
      measured: badOrder < 0 ? null : `bin ${badOrder}`,
      message:
        badOrder < 0
          ? `${fmt(lo[0])}–${fmt(hi[n - 1])} keV, increasing`
          : `bin ${badOrder} is empty or out of order (ENERG_LO ${fmt(lo[badOrder])}, ENERG_HI ${fmt(hi[badOrder])} keV${badOrder > 0 ? `, previous ENERG_LO ${fmt(lo[badOrder - 1])}` : ''})`,
    }),
  );
  const contiguous = worstGapRel <= GRID_CONTIGUITY_REL;
  out.push(
    makeCheck(contiguous ? 'pass' : 'fail', {
      id: `${idPrefix}.grid.contiguous`,
      title: 'energy bins contiguous (ENERG_HI[i] = ENERG_LO[i+1])',
      product,
      measured: worstGapRel,
      tolerance: GRID_CONTIGUITY_REL,
      unit: 'relative',
      message: contiguous
        ? 'bins touch'
        : `ENERG_HI[${worstGapAt}] = ${fmt(hi[worstGapAt])} keV but ENERG_LO[${worstGapAt + 1}] = ${fmt(lo[worstGapAt + 1])} keV`,
    }),
  );
  return out;
}

/**
 * Numeric checks of an ARF (OGIP CAL/GEN/92-002, memory): energy grid, SPECRESP finite and
 * non-negative, and—when the matching RMF is at hand—the same energy grid as the matrix, which
 * fitting packages require to multiply the two bin by bin.
 */
import type { ArfData, RmfData } from '../response/types.ts';
import { checkEnergyGrid } from './grid.ts';
import { fmt, makeCheck } from './make-check.ts';
import { GRID_MATCH_REL } from './tolerances.ts';
import type { Check } from './types.ts';

export function checkArfNumbers(arf: ArfData, product: string | null): Check[] {
  const out = checkEnergyGrid('arf', arf.energLoKeV, arf.energHiKeV, product);
  let nonFinite = 0, firstBad = -1, negative = 0, minV = Infinity, minAt = -1;
  arf.specrespCm2.forEach((v, i) => {
    if (!Number.isFinite(v)) {
      nonFinite++;
      if (firstBad < 0) firstBad = i;
    } else if (v < minV) [minV, minAt] = [v, i];
    if (v < 0) negative++;
  });
  out.push(
    makeCheck(nonFinite ? 'fail' : 'pass', {
      id: 'arf.specresp.finite',
      title: 'SPECRESP finite',
      product,
      measured: nonFinite,
      tolerance: 0,
      unit: 'bins',
      message: nonFinite
        ? `${nonFinite} non-finite SPECRESP value(s), first in bin ${firstBad} (${fmt(arf.energLoKeV[firstBad])}–${fmt(arf.energHiKeV[firstBad])} keV)`
        : 'all finite',
    }),
    makeCheck(negative ? 'fail' : 'pass', {
      id: 'arf.specresp.nonnegative',
      title: 'SPECRESP ≥ 0',
      product,
      measured: Number.isFinite(minV) ? minV : null,
      tolerance: '≥ 0',
      unit: 'cm**2',
      message: negative ? `${negative} negative value(s); smallest ${fmt(minV)} cm² in bin ${minAt}` : `smallest ${fmt(minV)} cm²`,
    }),
  );
  return out;
}

/** "arf.grid.matches-rmf": the ARF bins equal the RMF's ENERG_LO/ENERG_HI. */
export function checkArfMatchesRmf(arf: ArfData, rmf: RmfData, product: string | null): Check {
  const base = { id: 'arf.grid.matches-rmf', title: 'ARF energy grid equals the RMF grid', product, tolerance: GRID_MATCH_REL, unit: 'relative' };
  if (arf.energLoKeV.length !== rmf.energLoKeV.length) {
    return makeCheck('fail', { ...base, measured: `${arf.energLoKeV.length} vs ${rmf.energLoKeV.length} bins`, message: `ARF has ${arf.energLoKeV.length} bins, RMF ${rmf.energLoKeV.length}` });
  }
  let worst = 0, at = -1;
  for (let i = 0; i < arf.energLoKeV.length; i++) {
    for (const [x, y] of [[arf.energLoKeV[i], rmf.energLoKeV[i]], [arf.energHiKeV[i], rmf.energHiKeV[i]]]) {
      const rel = Math.abs(x - y) / Math.max(Math.abs(y), Number.MIN_VALUE);
      if (!(rel <= worst)) [worst, at] = [Number.isFinite(rel) ? rel : Infinity, i];
    }
  }
  const ok = worst <= GRID_MATCH_REL;
  return makeCheck(ok ? 'pass' : 'fail', {
    ...base,
    measured: worst,
    message: ok ? `${arf.energLoKeV.length} bins match` : `bin ${at} differs: ARF ${fmt(arf.energLoKeV[at])}–${fmt(arf.energHiKeV[at])} keV, RMF ${fmt(rmf.energLoKeV[at])}–${fmt(rmf.energHiKeV[at])} keV`,
  });
}

/**
 * Every numeric check of generators/checks on both sides of its tolerance: a value just inside
 * passes, a value just outside fails (or asks for review). A check loosened, tightened or made to
 * pass always fails here. The tolerances and where they come from are in checks/tolerances.ts; the
 * rules themselves: OGIP CAL/GEN/92-002 (memory) for rows ≤ 1, contiguous grids, the ARF on the RMF's
 * grid, SPECRESP ≥ 0 and channels within TLMIN…TLMIN+DETCHANS−1; "3σ = consistent with the
 * measurement" for closure (common practice, no source).
 */
import { describe, expect, it } from 'vitest';
import {
  checkArfMatchesRmf,
  checkArfNumbers,
  checkEfficiencyClosure,
  checkEnergyGrid,
  checkLineClosure,
  checkRmfNumbers,
  compareArf,
  compareRmf,
  fitCoreAt,
} from '../../generators/checks/index.ts';
import type { Check } from '../../generators/checks/types.ts';
import type { ArfData, RmfData } from '../../generators/response/types.ts';

/*
 * The limits, written out here rather than imported, so that loosening one in checks/tolerances.ts
 * fails this file (a change must be deliberate and change both):
 */
/** Rows ≤ 1 (OGIP CAL/GEN/92-002, memory) plus float32 accumulation over a few thousand elements: 2^-24 × ~170 ≈ 1e-5 (common practice, no source). */
const ROW_SUM_MAX_EXCESS = 1e-5;
/** Contiguous bins and the ARF on the RMF grid: float32-written grids are good to ~6e-8; 1e-6 (common practice, no source). */
const GRID_CONTIGUITY_REL = 1e-6;
const GRID_MATCH_REL = 1e-6;
/** Closure: 3σ is "consistent with the measurement" (common practice, no source); floors 1 eV, 2 eV and 0.005 for channel width and refit noise. */
const CLOSE = { centroidSigma: 3, centroidFloorEv: 1, fwhmSigma: 3, fwhmFloorEv: 2, efficiencySigma: 3, efficiencyFloor: 0.005 };
/**
 * The allowed deviation k·σ_total: the measurement's σ and the floor's systematic part (floor/3,
 * the floor being a 3σ bound) added in quadrature, as independent errors add (common practice,
 * no source); with σ = 0 it is the floor itself.
 */
const allowed = (k: number, sigma: number, floor: number) => k * Math.hypot(sigma, floor / 3);
/** Cross-release review: Kiln's stated choice (README, checks/tolerances.ts): 2 % area, 3 eV FWHM, 2 eV centroid, 0.01 row sum, 0.01 share below the core. */
const CMP = { areaRatio: 0.02, fwhmEv: 3, centroidEv: 2, rowSum: 0.01, lowShare: 0.01 };

/** "Just inside" and "just outside": 1 % on either side of the limit. */
const INSIDE = 0.99;
const OUTSIDE = 1.01;
const META = { telescop: 'KILNSAT', instrume: 'FIXTURECAM', filter: 'NONE', chantype: 'PI' as const, date: '2026-01-01' };

const byId = (checks: Check[], id: string): Check => {
  const c = checks.find((x) => x.id === id);
  if (!c) throw new Error(`no check ${id} among ${checks.map((x) => x.id).join(', ')}`);
  return c;
};

/** Channels 0.02 keV wide from 0, energy bins 0.05 keV wide over 1–8 keV (invented fixture). */
const CHANNELS = 512;
const CHANNEL_KEV = 0.02;
const BIN_KEV = 0.05;

/**
 * A matrix of Gaussian rows: the normal density (definition of the Gaussian) at each channel centre
 * times the channel width, scaled to `fraction`; centroid at the bin centre + shiftEv.
 */
/** `lowShare`: probability put in one channel at 30 % of the photon energy, far below the core (a soft tail's stand-in). */
function gaussianRmf(fwhmEv: number, shiftEv = 0, fraction = 0.9, lowShare = 0): RmfData {
  const lo = Array.from({ length: 140 }, (_, i) => 1 + i * BIN_KEV);
  const sigma = fwhmEv / (2 * Math.sqrt(2 * Math.LN2)) / 1000;
  const rows = lo.map((l) => {
    const mu = l + BIN_KEV / 2 + shiftEv / 1000;
    const m: number[] = [];
    let first = -1;
    for (let c = 0; c < CHANNELS; c++) {
      const x = (c + 0.5) * CHANNEL_KEV;
      const v = (fraction * CHANNEL_KEV * Math.exp(-0.5 * ((x - mu) / sigma) ** 2)) / (sigma * Math.sqrt(2 * Math.PI));
      if (v > 1e-9) {
        if (first < 0) first = c;
        m.push(v);
      } else if (first >= 0) break;
    }
    if (lowShare > 0) {
      const low = Math.floor((0.3 * l) / CHANNEL_KEV);
      return { fChan: Int32Array.of(low, first), nChan: Int32Array.of(1, m.length), matrix: Float32Array.from([lowShare, ...m]) };
    }
    return { fChan: Int32Array.of(first), nChan: Int32Array.of(m.length), matrix: Float32Array.from(m) };
  });
  return {
    meta: META,
    hduclas3: 'REDIST',
    detchans: CHANNELS,
    firstChannel: 0,
    loThres: 0,
    energLoKeV: Float64Array.from(lo),
    energHiKeV: Float64Array.from(lo, (l) => l + BIN_KEV),
    rows,
    ebounds: { firstChannel: 0, eMinKeV: Float64Array.from({ length: CHANNELS }, (_, c) => c * CHANNEL_KEV), eMaxKeV: Float64Array.from({ length: CHANNELS }, (_, c) => (c + 1) * CHANNEL_KEV) },
  };
}

/** A three-channel matrix whose single row has the given elements (float32, as stored). */
function tinyRmf(matrix: number[], fChan = 1, detchans = 8): RmfData {
  return {
    meta: META,
    hduclas3: 'REDIST',
    detchans,
    firstChannel: 1,
    loThres: 0,
    energLoKeV: Float64Array.of(1),
    energHiKeV: Float64Array.of(1.1),
    rows: [{ fChan: Int32Array.of(fChan), nChan: Int32Array.of(matrix.length), matrix: Float32Array.from(matrix) }],
    ebounds: { firstChannel: 1, eMinKeV: Float64Array.from({ length: detchans }, (_, c) => 0.1 * c), eMaxKeV: Float64Array.from({ length: detchans }, (_, c) => 0.1 * (c + 1)) },
  };
}

/** float32 nearest to 1 + excess, split over two elements so the float64 sum is exactly representable. */
function rowWithSum(excess: number): number[] {
  const half = Math.fround(0.5);
  return [half, Math.fround(0.5 + excess)];
}

describe('rmf.rows.sum-le-1 (1 + ROW_SUM_MAX_EXCESS)', () => {
  it(`a row summing to 1 + ${INSIDE}·${ROW_SUM_MAX_EXCESS} passes, to 1 + ${OUTSIDE}·${ROW_SUM_MAX_EXCESS} fails`, () => {
    const inside = rowWithSum(INSIDE * ROW_SUM_MAX_EXCESS);
    const outside = rowWithSum(OUTSIDE * ROW_SUM_MAX_EXCESS);
    // The float32 rounding (≤ 3e-8) is far below the 1e-7 step between the two sides.
    expect(inside[0] + inside[1] - 1).toBeLessThan(ROW_SUM_MAX_EXCESS);
    expect(outside[0] + outside[1] - 1).toBeGreaterThan(ROW_SUM_MAX_EXCESS);
    expect(byId(checkRmfNumbers(tinyRmf(inside), null), 'rmf.rows.sum-le-1').status).toBe('pass');
    expect(byId(checkRmfNumbers(tinyRmf(outside), null), 'rmf.rows.sum-le-1').status).toBe('fail');
  });
  it('a full response (HDUCLAS3 FULL, rows in cm²) is not held to ≤ 1', () => {
    const full = { ...tinyRmf([120, 30]), hduclas3: 'FULL' as const };
    expect(checkRmfNumbers(full, null).some((c) => c.id === 'rmf.rows.sum-le-1')).toBe(false);
  });
});

describe('rmf.channels.range (TLMIN … TLMIN + DETCHANS − 1)', () => {
  // DETCHANS 8 from channel 1: channels 1–8.
  it('a group ending on the last channel passes; one running one channel past it fails', () => {
    expect(byId(checkRmfNumbers(tinyRmf([0.2, 0.3, 0.4], 6), null), 'rmf.channels.range').status).toBe('pass');
    expect(byId(checkRmfNumbers(tinyRmf([0.2, 0.3, 0.4], 7), null), 'rmf.channels.range').status).toBe('fail');
  });
  it('a group starting on the first channel passes; one starting a channel before it fails', () => {
    expect(byId(checkRmfNumbers(tinyRmf([0.2, 0.3], 1), null), 'rmf.channels.range').status).toBe('pass');
    expect(byId(checkRmfNumbers(tinyRmf([0.2, 0.3], 0), null), 'rmf.channels.range').status).toBe('fail');
  });
});

describe('rmf.matrix.nonnegative and arf.specresp.nonnegative (≥ 0)', () => {
  it('a zero element passes, the smallest negative float32 fails', () => {
    const tiny = -(2 ** -149); // smallest float32 subnormal, negative
    expect(byId(checkRmfNumbers(tinyRmf([0, 0.5]), null), 'rmf.matrix.nonnegative').status).toBe('pass');
    expect(byId(checkRmfNumbers(tinyRmf([tiny, 0.5]), null), 'rmf.matrix.nonnegative').status).toBe('fail');
  });
  it('a zero SPECRESP passes, −1e-30 cm² fails', () => {
    const arf = (v: number): ArfData => ({ meta: META, energLoKeV: Float64Array.of(1, 2), energHiKeV: Float64Array.of(2, 3), specrespCm2: Float64Array.of(100, v) });
    expect(byId(checkArfNumbers(arf(0), null), 'arf.specresp.nonnegative').status).toBe('pass');
    expect(byId(checkArfNumbers(arf(-1e-30), null), 'arf.specresp.nonnegative').status).toBe('fail');
  });
});

describe('grid.contiguous (GRID_CONTIGUITY_REL) and arf.grid.matches-rmf (GRID_MATCH_REL)', () => {
  const grid = (gapRel: number) => ({ lo: Float64Array.of(1, 2 * (1 + gapRel)), hi: Float64Array.of(2, 3) });
  it(`a gap of ${INSIDE}·${GRID_CONTIGUITY_REL} relative passes, ${OUTSIDE}· fails`, () => {
    const a = grid(INSIDE * GRID_CONTIGUITY_REL);
    const b = grid(OUTSIDE * GRID_CONTIGUITY_REL);
    expect(byId(checkEnergyGrid('rmf', a.lo, a.hi, null), 'rmf.grid.contiguous').status).toBe('pass');
    expect(byId(checkEnergyGrid('rmf', b.lo, b.hi, null), 'rmf.grid.contiguous').status).toBe('fail');
  });
  it(`ARF bounds off the RMF's by ${INSIDE}·${GRID_MATCH_REL} relative pass, ${OUTSIDE}· fail`, () => {
    const rmf = tinyRmf([0.5]);
    const arf = (rel: number): ArfData => ({ meta: META, energLoKeV: Float64Array.of(1 * (1 + rel)), energHiKeV: Float64Array.of(1.1), specrespCm2: Float64Array.of(10) });
    expect(checkArfMatchesRmf(arf(INSIDE * GRID_MATCH_REL), rmf, null).status).toBe('pass');
    expect(checkArfMatchesRmf(arf(OUTSIDE * GRID_MATCH_REL), rmf, null).status).toBe('fail');
  });
});

describe('closure (k·σ of the line fit, with a floor)', () => {
  const rmf = gaussianRmf(120);
  const E = 5.025; // a bin centre
  const core = fitCoreAt(rmf, E, { side: 'upper' })!;
  const line = (centroidKeV: number, centroidErrEv: number, fwhmEv: number, fwhmErrEv: number) => ({ line: 'Test', energyKeV: E, centroidKeV, centroidErrEv, fwhmEv, fwhmErrEv, efficiency: null });
  const statusOf = (l: ReturnType<typeof line>, kind: 'centroid' | 'fwhm') => byId(checkLineClosure(rmf, l, null), `closure.${kind}.test`).status;

  it('the fixture has a core to fit', () => {
    expect(core).toBeTruthy();
  });
  it(`centroid: Δ = ${INSIDE}·${CLOSE.centroidSigma}σ passes, ${OUTSIDE}·${CLOSE.centroidSigma}σ fails (σ = 0.5 eV, above the floor)`, () => {
    const err = 0.5;
    expect(CLOSE.centroidSigma * err).toBeGreaterThan(CLOSE.centroidFloorEv);
    for (const sign of [1, -1]) {
      const a = allowed(CLOSE.centroidSigma, err, CLOSE.centroidFloorEv);
      expect(statusOf(line(core.centroidKeV + (sign * INSIDE * a) / 1000, err, core.fwhmEv, 1), 'centroid')).toBe('pass');
      expect(statusOf(line(core.centroidKeV + (sign * OUTSIDE * a) / 1000, err, core.fwhmEv, 1), 'centroid')).toBe('fail');
    }
  });
  it(`centroid floor: with a tiny σ, Δ = ${INSIDE}·${CLOSE.centroidFloorEv} eV passes, ${OUTSIDE}· fails`, () => {
    expect(statusOf(line(core.centroidKeV + (INSIDE * CLOSE.centroidFloorEv) / 1000, 0.01, core.fwhmEv, 1), 'centroid')).toBe('pass');
    expect(statusOf(line(core.centroidKeV + (OUTSIDE * CLOSE.centroidFloorEv) / 1000, 0.01, core.fwhmEv, 1), 'centroid')).toBe('fail');
  });
  it(`FWHM: Δ = ${INSIDE}·${CLOSE.fwhmSigma}σ passes, ${OUTSIDE}·${CLOSE.fwhmSigma}σ fails (σ = 1 eV, above the floor)`, () => {
    const err = 1;
    expect(CLOSE.fwhmSigma * err).toBeGreaterThan(CLOSE.fwhmFloorEv);
    for (const sign of [1, -1]) {
      const a = allowed(CLOSE.fwhmSigma, err, CLOSE.fwhmFloorEv);
      expect(statusOf(line(core.centroidKeV, 1, core.fwhmEv + sign * INSIDE * a, err), 'fwhm')).toBe('pass');
      expect(statusOf(line(core.centroidKeV, 1, core.fwhmEv + sign * OUTSIDE * a, err), 'fwhm')).toBe('fail');
    }
  });
  it(`FWHM floor: with a tiny σ, Δ = ${INSIDE}·${CLOSE.fwhmFloorEv} eV passes, ${OUTSIDE}· fails`, () => {
    expect(statusOf(line(core.centroidKeV, 1, core.fwhmEv - INSIDE * CLOSE.fwhmFloorEv, 0.01), 'fwhm')).toBe('pass');
    expect(statusOf(line(core.centroidKeV, 1, core.fwhmEv - OUTSIDE * CLOSE.fwhmFloorEv, 0.01), 'fwhm')).toBe('fail');
  });
  it(`efficiency: Δ = ${INSIDE}·${CLOSE.efficiencySigma}σ passes, ${OUTSIDE}· fails; floor ${CLOSE.efficiencyFloor} likewise`, () => {
    const check = (model: number, err: number) => checkEfficiencyClosure(model, { line: 'Test', energyKeV: E, efficiency: 0.8, efficiencyErr: err }, null)!.status;
    const err = 0.01;
    expect(CLOSE.efficiencySigma * err).toBeGreaterThan(CLOSE.efficiencyFloor);
    const a = allowed(CLOSE.efficiencySigma, err, CLOSE.efficiencyFloor);
    expect(check(0.8 + INSIDE * a, err)).toBe('pass');
    expect(check(0.8 - OUTSIDE * a, err)).toBe('fail');
    expect(check(0.8 - INSIDE * CLOSE.efficiencyFloor, 1e-5)).toBe('pass');
    expect(check(0.8 + OUTSIDE * CLOSE.efficiencyFloor, 1e-5)).toBe('fail');
    expect(checkEfficiencyClosure(0.8, { line: 'Test', energyKeV: E, efficiency: null }, null)).toBeNull();
  });
});

describe('cross-release review tolerances (compare.*)', () => {
  const arf = (scale: number): ArfData => ({
    meta: META,
    energLoKeV: Float64Array.from({ length: 20 }, (_, i) => 1 + i * 0.5),
    energHiKeV: Float64Array.from({ length: 20 }, (_, i) => 1.5 + i * 0.5),
    specrespCm2: Float64Array.from({ length: 20 }, (_, i) => (i === 10 ? scale : 1) * (200 + 10 * i)),
  });
  it(`area ratio 1 ± ${INSIDE}·${CMP.areaRatio} passes, 1 ± ${OUTSIDE}·${CMP.areaRatio} needs review`, () => {
    for (const sign of [1, -1]) {
      expect(byId(compareArf(arf(1), arf(1 + sign * INSIDE * CMP.areaRatio), null), 'review.arf.area-ratio').status).toBe('pass');
      expect(byId(compareArf(arf(1), arf(1 + sign * OUTSIDE * CMP.areaRatio), null), 'review.arf.area-ratio').status).toBe('review');
    }
  });
  // Cores of two Gaussian matrices differ by what was put in; the fit's bias is the same in both.
  it(`core FWHM change ${INSIDE}·${CMP.fwhmEv} eV passes, ${OUTSIDE}· needs review`, () => {
    const a = gaussianRmf(120);
    expect(byId(compareRmf(a, gaussianRmf(120 + INSIDE * CMP.fwhmEv), null), 'review.rmf.fwhm').status).toBe('pass');
    expect(byId(compareRmf(a, gaussianRmf(120 + OUTSIDE * CMP.fwhmEv), null), 'review.rmf.fwhm').status).toBe('review');
  });
  it(`core centroid change ${INSIDE}·${CMP.centroidEv} eV passes, ${OUTSIDE}· needs review`, () => {
    const a = gaussianRmf(120);
    expect(byId(compareRmf(a, gaussianRmf(120, INSIDE * CMP.centroidEv), null), 'review.rmf.centroid').status).toBe('pass');
    expect(byId(compareRmf(a, gaussianRmf(120, -OUTSIDE * CMP.centroidEv), null), 'review.rmf.centroid').status).toBe('review');
  });
  it(`row-sum change ${INSIDE}·${CMP.rowSum} passes, ${OUTSIDE}· needs review`, () => {
    const a = gaussianRmf(120, 0, 0.9);
    expect(byId(compareRmf(a, gaussianRmf(120, 0, 0.9 - INSIDE * CMP.rowSum), null), 'review.rmf.row-sum').status).toBe('pass');
    expect(byId(compareRmf(a, gaussianRmf(120, 0, 0.9 + OUTSIDE * CMP.rowSum), null), 'review.rmf.row-sum').status).toBe('review');
  });
  // The extra share sits wholly below centroid − 2σ, so the change measured is the share put in.
  it(`change of the share below the core ${INSIDE}·${CMP.lowShare} passes, ${OUTSIDE}· needs review`, () => {
    const a = gaussianRmf(120, 0, 0.9);
    const inside = byId(compareRmf(a, gaussianRmf(120, 0, 0.9, INSIDE * CMP.lowShare), null), 'review.rmf.low-share');
    expect(inside.status).toBe('pass');
    expect(inside.measured as number).toBeCloseTo(INSIDE * CMP.lowShare, 6);
    const outside = byId(compareRmf(a, gaussianRmf(120, 0, 0.9, OUTSIDE * CMP.lowShare), null), 'review.rmf.low-share');
    expect(outside.status).toBe('review');
    expect(outside.measured as number).toBeCloseTo(OUTSIDE * CMP.lowShare, 6);
  });
});

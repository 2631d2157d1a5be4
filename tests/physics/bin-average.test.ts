/**
 * Bin-averaged ARF: SPECRESP of each bin is the mean of mirror × efficiency over the bin (flat
 * spectrum inside the bin), with absorption edges resolved. Checked against an independent
 * fine-grid integral (composite trapezoid on 20,001 uniform points per bin, which knows nothing of
 * the edges; its error at a jump is ≤ jump/20,000 of the bin, below the 1e-4 tolerance by 2×).
 */
import { describe, expect, it } from 'vitest';
import { binAverages, binQuadrature, effectiveArea, efficiencyBreakdown, stackEdgesKeV, tableEdgesKeV } from '../../generators/physics/index.ts';
import { DEMO_STACK } from './stack-fixture.ts';

const MIRROR = { energyKeV: [0.1, 0.5, 1, 2, 5, 12.5], areaCm2: [50, 300, 420, 380, 150, 20] };
const FINE = 20_000;
const DATE = '2026-06-01';

function fineAverage(lo: number, hi: number): number {
  const e = Float64Array.from({ length: FINE + 1 }, (_, k) => lo + ((hi - lo) * k) / FINE);
  const qe = efficiencyBreakdown(DEMO_STACK, e, DATE).detectorQE;
  // mirror by the same log-log rule, point by point (bin-centre sampler on zero-width bins is not
  // allowed, so interpolate here directly: log-log between table knots, mathematics)
  const m = MIRROR;
  const area = (x: number) => {
    let k = 0;
    while (k < m.energyKeV.length - 2 && x > m.energyKeV[k + 1]) k++;
    const [e0, e1, a0, a1] = [m.energyKeV[k], m.energyKeV[k + 1], m.areaCm2[k], m.areaCm2[k + 1]];
    return Math.exp(Math.log(a0) + (Math.log(a1 / a0) * Math.log(x / e0)) / Math.log(e1 / e0));
  };
  let s = 0;
  for (let k = 0; k <= FINE; k++) s += (k === 0 || k === FINE ? 0.5 : 1) * area(e[k]) * qe[k];
  return s / FINE;
}

describe('bin-averaged effective area (edges resolved) vs a fine-grid integral', () => {
  // 15 eV bins like the demo's; bins that contain the C K, O K, Al K and Si K jumps of the stack's
  // own cross-section data, plus smooth ones.
  const edges = stackEdgesKeV(DEMO_STACK).filter((e) => e > 0.2 && e < 10);
  const lo: number[] = [];
  for (const e of edges) lo.push(e - 0.004);
  lo.push(0.35, 1.0, 3.3, 6.0, 9.1);
  lo.sort((a, b) => a - b);
  const loA = Float64Array.from(lo);
  const hiA = loA.map((l) => l + 0.015);

  it('the stack has the expected edges (C, N, O K; Al K; Si K from xraylib data)', () => {
    for (const el of ['C', 'O', 'Al', 'Si']) for (const e of tableEdgesKeV(el).filter((x) => x > 0.2 && x < 3)) expect(edges).toContain(e);
    expect(edges.length).toBeGreaterThanOrEqual(5);
  });

  it('every bin, edge or not, within 1e-4 of the fine-grid average', () => {
    // bins overlap in this test set only if two edges are < 15 eV apart; evaluate them one by one
    for (let i = 0; i < loA.length; i++) {
      const arf = effectiveArea(DEMO_STACK, MIRROR, loA.subarray(i, i + 1), hiA.subarray(i, i + 1), DATE);
      const ref = fineAverage(loA[i], hiA[i]);
      expect(Math.abs(arf.specrespCm2[0] / ref - 1)).toBeLessThan(1e-4);
    }
  });

  it('the centre sample of an edge bin is far off (the fault the average fixes), so the test can fail', () => {
    const si = edges.find((e) => e > 1.8 && e < 1.9)!;
    const lo1 = Float64Array.of(si - 0.004);
    const hi1 = Float64Array.of(si + 0.011);
    const centre = efficiencyBreakdown(DEMO_STACK, Float64Array.of(si + 0.0035), DATE).detectorQE[0];
    const avg = effectiveArea(DEMO_STACK, { energyKeV: [0.1, 20], areaCm2: [1, 1] }, lo1, hi1, DATE).detectorQE[0];
    expect(Math.abs(centre / avg - 1)).toBeGreaterThan(1e-3);
  });

  it('quadrature weights of each bin sum to 1 and integrate a linear function exactly', () => {
    const q = binQuadrature([1, 2], [2, 2.5], [1.3, 1.31, 2.2]);
    const avg = binAverages(q, Array.from(q.energiesKeV, (e) => 3 * e + 1));
    expect(avg[0]).toBeCloseTo(3 * 1.5 + 1, 12);
    expect(avg[1]).toBeCloseTo(3 * 2.25 + 1, 12);
  });
});

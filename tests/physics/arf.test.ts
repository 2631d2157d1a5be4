import { describe, expect, it } from 'vitest';
import { KilnInputError } from '../../generators/errors.ts';
import { efficiencyBreakdown, effectiveArea, mirrorAreaAtBinCentres } from '../../generators/physics/index.ts';
import { DEMO_STACK } from './stack-fixture.ts';

// A power law A(E) = A0·E^k is a straight line in log-log, so log-log interpolation must reproduce it
// exactly between any nodes (mathematics, no source). Invented mirror.
const A0_CM2 = 400;
const SLOPE = -0.7;
const power = (e: number) => A0_CM2 * Math.pow(e, SLOPE);
const NODES = [0.1, 0.25, 0.6, 1.3, 2.9, 6.1, 12.5];
const MIRROR = { energyKeV: NODES, areaCm2: NODES.map(power), file: 'mirror.csv' };

function grid(lo: number, hi: number, n: number): [Float64Array, Float64Array] {
  const edges = Array.from({ length: n + 1 }, (_, i) => lo * Math.pow(hi / lo, i / n));
  return [Float64Array.from(edges.slice(0, -1)), Float64Array.from(edges.slice(1))];
}

describe('mirror area on the response grid (log-log at bin centres)', () => {
  it('reproduces a power law at the bin centres', () => {
    const [lo, hi] = grid(0.2, 12, 57);
    const a = mirrorAreaAtBinCentres(MIRROR, lo, hi);
    a.forEach((v, i) => expect(v / power(0.5 * (lo[i] + hi[i]))).toBeCloseTo(1, 12));
  });

  it('SPECRESP is ArfData-shaped and equals mirror × efficiency where both are smooth across the bin', () => {
    const [lo, hi] = grid(0.3, 10, 20);
    const arf = effectiveArea(DEMO_STACK, MIRROR, lo, hi, '2026-06-01');
    expect(arf.specrespCm2).toBeInstanceOf(Float64Array);
    expect(Array.from(arf.energLoKeV)).toEqual(Array.from(lo));
    // a bin average of a smooth function differs from its centre value by ~f''·Δ²/24 (midpoint
    // rule error, mathematics): within 1 % for these log bins away from edges
    const centres = lo.map((l, i) => 0.5 * (l + hi[i]));
    const qe = efficiencyBreakdown(DEMO_STACK, centres, '2026-06-01').detectorQE;
    const ratios = Array.from(arf.specrespCm2, (v, i) => v / (power(centres[i]) * qe[i]));
    expect(ratios.filter((r) => Math.abs(r - 1) < 0.01).length).toBeGreaterThan(12);
  });

  it('zero areas interpolate linearly instead of failing in log', () => {
    const m = { energyKeV: [1, 2, 3], areaCm2: [0, 10, 20] };
    const a = mirrorAreaAtBinCentres(m, Float64Array.of(1, 2), Float64Array.of(2, 3));
    expect(a[0]).toBeCloseTo(5, 12);
    // the segment next to it has two positive nodes: still the power law through them at 2.5 keV,
    // 10·(2.5/2)^(ln 2 / ln 1.5) (mathematics, no source)
    expect(a[1]).toBeCloseTo(10 * Math.pow(1.25, Math.log(2) / Math.log(1.5)), 12);
  });
});

describe('bad mirror tables and grids', () => {
  const [lo, hi] = grid(0.2, 12, 10);
  const cases: [string, unknown, RegExp][] = [
    ['starts above the grid', { energyKeV: [0.3, 15], areaCm2: [1, 1], file: 'm.csv' }, /does not cover the response energy grid/],
    ['ends below the grid', { energyKeV: [0.1, 11.9], areaCm2: [1, 1] }, /does not cover/],
    ['unequal lengths', { energyKeV: [0.1, 1, 20], areaCm2: [1, 1] }, /as many areas as energies/],
    ['energies not increasing', { energyKeV: [0.1, 5, 3, 20], areaCm2: [1, 1, 1, 1] }, /row 3 is not positive and strictly increasing/],
    ['negative area', { energyKeV: [0.1, 20], areaCm2: [1, -1] }, /area in row 2/],
  ];
  it.each(cases)('%s', (_, m, msg) => {
    try {
      mirrorAreaAtBinCentres(m as never, lo, hi);
      expect.unreachable();
    } catch (e) {
      expect(e).toBeInstanceOf(KilnInputError);
      expect((e as KilnInputError).message).toMatch(msg);
    }
  });
  it('names the mirror file in coverage errors', () => {
    try {
      mirrorAreaAtBinCentres({ ...MIRROR, energyKeV: [0.3, 15], areaCm2: [1, 1] }, lo, hi);
      expect.unreachable();
    } catch (e) {
      expect((e as KilnInputError).oneLine()).toMatch(/^mirror\.csv: energyKeV: .*expected a table spanning at least 0.2–12/);
    }
  });
  it('decreasing response grid', () => {
    expect(() => mirrorAreaAtBinCentres(MIRROR, Float64Array.of(2, 1), Float64Array.of(3, 2))).toThrow(/bin 2 is not increasing/);
  });
});

/**
 * The comparison in-process (kiln compare prints these; its CLI tests run in a child process that
 * per-test coverage does not see): probe energies, the B − A and B / A rules of the tables, the
 * review verdict and what the text report must say. Laws: probe energies at the centres of n equal
 * steps in ln E (a geometric mean of each step's ends: definition); Δ = B − A and ratio = B / A as
 * the report's header states; a ratio has no value where A has no area (division by zero).
 */
import { describe, expect, it } from 'vitest';
import { arfDiffTable, formatCompareText, formatImpactText, needsReview, probeEnergies, rmfDiffTable, type CompareReport } from '../../generators/compare/index.ts';
import type { ArfData, RmfData } from '../../generators/response/types.ts';
import type { Check, ReleaseSpectral } from '../../generators/site-data/types.ts';
import { META } from '../response/spec-fixtures.ts';

describe('probe energies', () => {
  it('n centres of equal steps in ln E over the common range of the two grids', () => {
    const e = probeEnergies(0.2, 12, 0.3, 10, 8);
    expect(e).toHaveLength(8);
    const step = Math.log(10 / 0.3) / 8;
    e.forEach((x, i) => expect(Math.log(x)).toBeCloseTo(Math.log(0.3) + (i + 0.5) * step, 12));
    expect(Math.min(...e)).toBeGreaterThan(0.3);
    expect(Math.max(...e)).toBeLessThan(10);
  });
  it('no probes when the grids do not overlap, or only touch', () => {
    expect(probeEnergies(0.2, 1, 1, 2)).toEqual([]);
    expect(probeEnergies(2, 3, 0.2, 1)).toEqual([]);
  });
  it('16 by default', () => expect(probeEnergies(0.2, 12, 0.2, 12)).toHaveLength(16));
});

/** A 4-bin ARF with the given areas on 1–5 keV. */
const arf = (areas: number[]): ArfData => ({ meta: META, energLoKeV: Float64Array.of(1, 2, 3, 4), energHiKeV: Float64Array.of(2, 3, 4, 5), specrespCm2: Float64Array.from(areas) });

describe('area table', () => {
  it('default probes lie on the common range of the two grids (1–3 keV of 1–5 and 1–3)', () => {
    const short: ArfData = { meta: META, energLoKeV: Float64Array.of(1, 2), energHiKeV: Float64Array.of(2, 3), specrespCm2: Float64Array.of(1, 1) };
    const rows = arfDiffTable(arf([1, 1, 1, 1]), short);
    expect(rows).toHaveLength(16);
    expect(Math.min(...rows.map((r) => r.energyKeV))).toBeGreaterThan(1);
    expect(Math.max(...rows.map((r) => r.energyKeV))).toBeLessThan(3);
  });
  it('ratio B / A per probe, none where A has no area (B may have some)', () => {
    const rows = arfDiffTable(arf([0, 10, 10, 10]), arf([5, 20, 5, 10]), [1.5, 2.5, 3.5, 4.5]);
    expect(rows.map((r) => r.ratio)).toEqual([null, 2, 0.5, 1]);
    expect(rows[0].areaBCm2).toBe(5);
  });
});

/** One channel per bin, row i entirely in channel i, scaled by `scale` (row sum = scale). */
function diagonal(scale: number): RmfData {
  const n = 6;
  const lo = Float64Array.from({ length: n }, (_, i) => 1 + i);
  return {
    meta: META,
    energLoKeV: lo,
    energHiKeV: lo.map((e) => e + 1),
    rows: Array.from({ length: n }, (_, i) => ({ fChan: [i], nChan: [1], matrix: Float32Array.of(scale) })),
    ebounds: { channel: Int32Array.from({ length: n }, (_, i) => i), eMinKeV: lo, eMaxKeV: lo.map((e) => e + 1) },
    firstChannel: 0,
    detchans: n,
    lowThresholdKeV: 0,
  } as unknown as RmfData;
}

describe('matrix table', () => {
  it('row sums: A and B − A (B with 90 % of A in every row)', () => {
    const rows = rmfDiffTable(diagonal(1), diagonal(0.9), [2.5, 4.5]);
    for (const r of rows) {
      expect(r.rowSumA).toBeCloseTo(1, 6);
      expect(r.rowSumDiff).toBeCloseTo(-0.1, 6);
    }
  });
});

const check = (status: Check['status'], id = 'review.rmf.centroid'): Check => ({ id, title: id, status, product: null, measured: 3, tolerance: 2, unit: 'eV', message: `${status} message` });
const report = (checks: Check[], over: Partial<CompareReport> = {}): CompareReport => ({
  schema: 'kiln/compare/1',
  a: '1.0.0',
  b: '1.1.0',
  pairs: [{ label: 'fi0 ARF e1', detector: 'fi0', a: 'a.arf', b: 'b.arf', kind: 'arf', arf: [{ energyKeV: 1.5, areaACm2: 0, areaBCm2: 5, ratio: null }], checks }],
  parameters: [],
  unmatched: [],
  ...over,
});

describe('review verdict and text report', () => {
  it('needs review when any pair has a review or failed check; warnings and passes do not', () => {
    expect(needsReview(report([check('pass'), check('warn')]))).toBe(false);
    expect(needsReview(report([check('pass'), check('review')]))).toBe(true);
    expect(needsReview(report([check('fail')]))).toBe(true);
    // Any pair, not every pair.
    const two = report([check('pass')]);
    two.pairs.push({ ...two.pairs[0], label: 'bi1 ARF e1', checks: [check('review')] });
    expect(needsReview(two)).toBe(true);
  });
  it('names both sides, shows a missing ratio as —, counts what is beyond the tolerances', () => {
    const t = formatCompareText(report([check('review'), check('pass', 'review.arf.ratio'), check('fail', 'review.x')]));
    expect(t.split('\n')[0]).toBe('comparing 1.0.0 (A) with 1.1.0 (B)');
    expect(t).toContain('fi0 ARF e1: a.arf → b.arf');
    expect(t).toMatch(/1\.5000\s+0\.000\s+5\.000\s+—/);
    expect(t).toContain('within tolerance  review.arf.ratio: pass message');
    expect(t).toMatch(/REVIEW\s+review\.rmf\.centroid\s+measured 3 eV, allowed 2 eV: review message/);
    expect(t.trim().split('\n').pop()).toBe('2 differences beyond the review tolerances');
  });
  it('with nothing beyond: says so; lists parameters with Δ = B − A and σ, and unmatched products', () => {
    const t = formatCompareText(
      report([check('pass')], {
        parameters: [{ detector: 'fi0', group: 'resolution', name: 'read noise', unit: 'e⁻', a: 4, b: 4.5, diff: 0.5, sigmas: 1.25 }, { detector: null, group: 'g', name: 'new', unit: '', a: null, b: 3, diff: null, sigmas: null }],
        unmatched: ['bi1 RMF'],
      }),
    );
    expect(t).toContain('parameter changes (A → B):');
    expect(t).toContain('  fi0  resolution: read noise: 4 → 4.5 e⁻ (Δ 0.5, 1.3σ)');
    expect(t).toContain('  -  g: new: — → 3');
    expect(t).toContain('only on one side: bi1 RMF');
    expect(t.trim().split('\n').pop()).toBe('all differences within the review tolerances');
  });
});

describe('text report layout', () => {
  it('one blank line before each pair, the parameter list and the unmatched list, and before the verdict (the layout the README shows)', () => {
    const t = formatCompareText(
      report([check('review')], {
        pairs: [
          { label: 'fi0 RMF', detector: 'fi0', a: 'a.rmf', b: 'b.rmf', kind: 'rmf', rmf: [{ energyKeV: 1, centroidAKeV: 0.999, centroidDiffEv: null, fwhmAEv: 80, fwhmDiffEv: 1.5, rowSumA: 0.98, rowSumDiff: -0.01 }], checks: [] },
          { label: 'fi0 ARF e1', detector: 'fi0', a: 'a.arf', b: 'b.arf', kind: 'arf', arf: [], checks: [check('review')] },
        ],
        parameters: [{ detector: 'fi0', group: 'resolution', name: 'Fano factor', unit: '', a: 0.118, b: 0.12, diff: 0.002, sigmas: null }],
        unmatched: ['bi1 RMF'],
      }),
    );
    const lines = t.split('\n');
    const blanks = lines.flatMap((l, i) => (l === '' ? [i] : []));
    // After the title; before each of the two pairs, the parameters, the unmatched list and the verdict.
    expect(blanks.map((i) => lines[i + 1].split(':')[0])).toEqual(['fi0 RMF', 'fi0 ARF e1', 'parameter changes (A → B)', 'only on one side', '1 difference beyond the review tolerances']);
    // Matrix rows: each value right-aligned under its column's label, a missing value as —.
    const head = lines.find((l) => l.includes('energy keV'))!;
    const row = lines[lines.indexOf(head) + 1];
    expect(row.trim().split(/\s+/)).toEqual(['1.0000', '0.99900', '—', '80.00', '1.50', '0.98000', '-0.01000']);
    const ends = (l: string) => [...l.matchAll(/\S+(?: \S+)*/g)].map((m) => m.index! + m[0].length);
    expect(ends(row)).toEqual(ends(head));
    expect(lines).toContain('  fi0  resolution: Fano factor: 0.118 → 0.12 (Δ 0.002)');
  });
});

describe('impact text', () => {
  const spectral = (impact: unknown[]) =>
    ({ release: '2.1.0', comparedWith: '2.0.0', tolerance: { shiftSigma: 1, rateRatio: 0.01, reason: 'r' }, impact }) as unknown as ReleaseSpectral;
  it('marks review items, prints each parameter and band with both releases', () => {
    const t = formatImpactText(
      spectral([
        {
          detector: 'fi0', source: 'pl', exposureS: 20000, simulatedCounts: 12345, seed: 7,
          parameters: [{ name: 'index', unit: '', newer: 1.9, newerError: 0.011, older: 1.896, shift: 0.004, shiftSigma: 0.36, review: false }, { name: 'nH', unit: 'cm-2', newer: 3e21, newerError: 4.2e19, older: 2.9e21, shift: 1e20, shiftSigma: 2.38, review: true }],
          bands: [{ name: 'soft', loKeV: 0.3, hiKeV: 2, newerRateCps: 3.287, olderRateCps: 3.2, ratio: 1.0272, review: true }, { name: 'hard', loKeV: 5, hiKeV: 10, newerRateCps: 0, olderRateCps: 0, ratio: null, review: false }],
        },
      ]),
    );
    const lines = t.split('\n');
    expect(lines[0]).toBe('Impact on the reference sources: simulated with 2.1.0, fitted with 2.1.0 and 2.0.0 (review beyond 1 σ or a band rate ratio beyond 1 ± 0.01)');
    expect(lines[1]).toBe('  fi0 pl (20000 s, 12345 counts, seed 7)');
    expect(lines[2]).toBe('    within  index: 1.9 ± 0.011 with 2.1.0, 1.896 with 2.0.0: shift 0.004 (0.36 σ)');
    expect(lines[3]).toBe('    REVIEW  nH: 3.0000e+21 ± 4.2000e+19 with 2.1.0, 2.9000e+21 with 2.0.0: shift 1.0000e+20 cm-2 (2.38 σ)');
    expect(lines[4]).toBe('    REVIEW  soft band 0.3–2 keV: 3.287 counts/s with 2.1.0, 3.2 with 2.0.0 (ratio 1.0272)');
    expect(lines[5]).toBe('    within  hard band 5–10 keV: 0.0000e+0 counts/s with 2.1.0, 0.0000e+0 with 2.0.0 (ratio —)');
  });
  it('plain numbers from 1e-3 up to (not including) 1e6, exponent form outside', () => {
    const one = (newer: number) =>
      formatImpactText(spectral([{ detector: 'd', source: 's', exposureS: 1, simulatedCounts: 1, seed: 1, parameters: [{ name: 'p', unit: '', newer, newerError: 1, older: 1, shift: 1, shiftSigma: 1, review: false }], bands: [] }])).split('\n')[2];
    expect(one(1e-3)).toContain('p: 0.001 ±');
    expect(one(123456)).toContain('p: 123460 ±'); // 5 significant digits
    expect(one(1e6)).toContain('p: 1.0000e+6 ±');
    expect(one(9.9e-4)).toContain('p: 9.9000e-4 ±');
  });
  it('says when no detector can be compared', () => {
    expect(formatImpactText(spectral([])).split('\n')[1]).toBe('  no detector has a matrix and an effective area in both releases');
  });
});

/**
 * Closure judged jointly: the χ² tail and the normal quantile against scipy (Debian
 * python3-scipy: scipy.stats.chi2.sf, scipy.stats.norm.isf), and a seeded simulation that correct
 * inputs for 32 regions × 6 lines fail a release at the stated false-alarm probability, while one
 * bad line is caught. Pulls of correct inputs are drawn N(0, 1): the worst case (the systematic
 * part of σ_total only makes real pulls smaller).
 */
import { describe, expect, it } from 'vitest';
import { chiSquareSurvival, normalUpperQuantile } from '../../generators/checks/chi-square.ts';
import { judgeJointly, type ClosurePull } from '../../generators/checks/closure-joint.ts';
import { gaussian, mulberry32 } from '../../scripts/prng.ts';
import { runPythonJson, pythonWith } from '../support/python.ts';

const haveScipy = pythonWith('scipy') !== null || process.env.CI === 'true';

describe.runIf(haveScipy)('χ² survival and normal quantile vs scipy', () => {
  const cases: [number, number][] = [
    [0.5, 1], [3.84, 1], [10, 1], [1, 2], [20, 7], [31.4, 20], [60, 30], [150, 100], [400, 192], [800, 576], [1e-3, 3], [5, 50],
  ];
  const ps = [0.5, 0.1, 1e-3, 1e-5, 1e-9, 2.5e-6];
  const ref = runPythonJson<{ sf: number[]; isf: number[] }>(
    'scipy',
    `import json, sys
from scipy.stats import chi2, norm
d = json.load(sys.stdin)
print(json.dumps({"sf": [float(chi2.sf(x, k)) for x, k in d["c"]], "isf": [float(norm.isf(p)) for p in d["p"]]}))`,
    { c: cases, p: ps },
  );
  it('P(χ²_k ≥ x) within 1e-9 relative (or 1e-15 absolute)', () => {
    cases.forEach(([x, k], i) => expect(Math.abs(chiSquareSurvival(x, k) - ref.sf[i])).toBeLessThan(1e-15 + 1e-9 * ref.sf[i]));
  });
  it('Φ⁻¹(1 − p) within 1e-9', () => {
    ps.forEach((p, i) => expect(Math.abs(normalUpperQuantile(p) - ref.isf[i])).toBeLessThan(1e-9));
  });
});

const REGIONS = 32;
const LINES = 6;
const QUANTITIES = ['centroid', 'fwhm', 'tail-fraction'] as const;

function region(g: () => number, bias?: { line: number; pull: number }): ClosurePull[] {
  const out: ClosurePull[] = [];
  for (let l = 0; l < LINES; l++)
    for (const q of QUANTITIES) {
      let z = g();
      if (bias && bias.line === l && q === 'fwhm') z += bias.pull;
      out.push({ line: `L${l}`, quantity: q, residual: z, sigma: 1, unit: 'eV', independent: true });
    }
  return out;
}

/** Share of seeded releases (32 regions each) in which some region fails. */
function releaseFailRate(alpha: number, trials: number, seed: number, bias?: { line: number; pull: number }): number {
  const g = gaussian(mulberry32(seed));
  const settings = { falseAlarm: alpha, detectors: REGIONS, source: 'test' };
  let failed = 0;
  for (let t = 0; t < trials; t++) {
    let any = false;
    for (let r = 0; r < REGIONS; r++) if (judgeJointly(region(g, r === 0 ? bias : undefined), settings).failed) any = true;
    if (any) failed++;
  }
  return failed / trials;
}

describe('false-alarm rate of the joint closure (seeded, 32 regions × 6 lines × 3 quantities)', () => {
  it('correct inputs fail a release at the stated 1e-3 (measured over 40,000 releases)', () => {
    const rate = releaseFailRate(1e-3, 40_000, 0x12a5);
    // union bound ≤ α; expected ~0.9α (χ² and max-pull overlap a little). 40 expected failures:
    // Poisson 3σ is ±19, so [0.4α, 1.4α] fails a rule that is off by 2× either way.
    expect(rate).toBeGreaterThan(0.4e-3);
    expect(rate).toBeLessThan(1.4e-3);
  });

  it('and at a stated 0.05 (tighter relative check, 4,000 releases)', () => {
    const rate = releaseFailRate(0.05, 4_000, 0x12a6);
    // expected 0.045–0.05; 200 failures: Poisson 3σ ±0.011
    expect(rate).toBeGreaterThan(0.034);
    expect(rate).toBeLessThan(0.061);
  });

  it('the old rule (any line beyond 3σ) fails most such releases: the fault this fixes', () => {
    const g = gaussian(mulberry32(7));
    let failed = 0;
    for (let t = 0; t < 500; t++) if (Array.from({ length: REGIONS * LINES * 2 }, g).some((z) => Math.abs(z) > 3)) failed++;
    expect(failed / 500).toBeGreaterThan(0.6); // 1 − 0.9973^384 ≈ 0.65
  });

  it('one line off by 6σ in one region is caught in most releases', () => {
    expect(releaseFailRate(1e-3, 300, 0x12a7, { line: 2, pull: 6 })).toBeGreaterThan(0.7);
  });

  it('interpolated quantities are shown but not counted', () => {
    const pulls: ClosurePull[] = [{ line: 'A', quantity: 'tail-fraction', residual: 50, sigma: 1, unit: 'fraction', independent: false }];
    expect(judgeJointly(pulls, { falseAlarm: 1e-3, detectors: 1, source: 't' }).failed).toBe(false);
  });
});

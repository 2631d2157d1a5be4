import { describe, expect, it } from 'vitest';
import { escapeFraction, escapeFractionFromMu } from '../../generators/physics/escape.ts';
import { runXraylibChecks } from '../support/python.ts';
import { exactEscapeInputs, siliconFromXraylib } from './escape-silicon-xraylib.ts';

describe('Si Kα escape fraction, thick slab', () => {
  it('closed form equals the depth × angle integral it comes from (derivation check, no table)', () => {
    // η = ω(1 − 1/J) ∫₀^∞ μE e^{−μE z} · ½ ∫₀¹ e^{−μf z / c} dc dz; inner z-integral done analytically: ½ ∫₀¹ c μE/(c μE + μf) dc
    for (const [muE, muF] of [
      [3000, 350],
      [150, 350],
      [5, 350],
    ]) {
      const n = 200000;
      let s = 0;
      for (let i = 0; i < n; i++) {
        const c = (i + 0.5) / n;
        s += (c * muE) / (c * muE + muF) / n;
      }
      const numeric = 0.05 * (1 - 1 / 10) * 0.5 * s;
      expect(escapeFractionFromMu(0.05, 10, muE, muF) / numeric - 1).toBeLessThan(1e-6);
      expect(escapeFractionFromMu(0.05, 10, muE, muF) / numeric - 1).toBeGreaterThan(-1e-6);
    }
  });

  it.runIf(runXraylibChecks)('xraylib: Si Kα at 1.740 keV and K edge at 1.839 keV (Bearden, Rev. Mod. Phys. 39, 78 (1967) and Bearden & Burr, ibid. 125, from memory; tol 1 eV)', () => {
    const si = siliconFromXraylib([]);
    expect(Math.abs(si.kAlphaKeV - 1.74)).toBeLessThan(0.001);
    expect(Math.abs(si.kEdgeKeV - 1.839)).toBeLessThan(0.001);
  });

  it.runIf(runXraylibChecks)('xraylib data: zero below the edge, ~1–2 % just above, falling with energy (thick-slab escape, Reed & Ware, J. Phys. E 5, 582 (1972), from memory)', () => {
    const energies = [1.0, 1.5, 1.83, 1.845, 1.9, 2, 2.5, 3, 4, 5, 6, 8, 10, 12];
    const si = siliconFromXraylib(energies);
    const inputs = exactEscapeInputs(si);
    const eta = energies.map((e) => escapeFraction(e, inputs));
    for (let i = 0; i < 3; i++) expect(eta[i]).toBe(0);
    expect(eta[3]).toBeGreaterThan(0.01);
    expect(eta[3]).toBeLessThan(0.02);
    for (let i = 4; i < energies.length; i++) expect(eta[i]).toBeLessThan(eta[i - 1]);
    // at 10 keV it is a small fraction of its value at the edge (μE ≪ μf there)
    expect(eta[energies.indexOf(10)]).toBeLessThan(0.2 * eta[3]);
    // never above the ceiling ½ ω (1 − 1/J)
    const ceiling = 0.5 * si.fluorescenceYield * (1 - 1 / si.jumpRatio);
    for (const v of eta) expect(v).toBeLessThan(ceiling);
  });
});

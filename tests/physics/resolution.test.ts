import { describe, expect, it } from 'vitest';
import {
  FWHM_PER_SIGMA,
  checkAboveFanoLimit,
  checkResolutionParams,
  electronsFreed,
  fanoLimitFwhmEv,
  fwhmEv,
  readNoiseForFwhmE,
  type ResolutionParams,
} from '../../generators/physics/resolution.ts';
import { KilnInputError } from '../../generators/errors.ts';

const W = 3.65; // eV per pair in silicon at room temperature (≈3.65–3.68: Scholze, Rabus & Ulm, J. Appl. Phys. 84, 2926 (1998), from memory)
const MN_KA_KEV = 5.899; // Mn Kα1 (Bearden, Rev. Mod. Phys. 39, 78 (1967), from memory)

function law(readNoiseE: number, fano: number, npix: number, sigma0Ev = 0): ResolutionParams {
  return { pairEnergyEv: W, fano, readNoiseE, sigma0Ev, pixelsPerEvent: { a: npix, bPerKeV: 0 } };
}

describe('resolution law', () => {
  it('FWHM/σ is 2√(2 ln 2) ≈ 2.3548 (definition of the FWHM of a Gaussian)', () => {
    expect(FWHM_PER_SIGMA).toBeCloseTo(2.3548, 4); // 2√(2 ln 2) = 2.35482…
    // the definition itself (mathematics, no source): half maximum of exp(−x²/2) at x = √(2 ln 2)
    expect(Math.abs(FWHM_PER_SIGMA - Math.sqrt(8 * Math.log(2)))).toBeLessThan(1e-15);
    expect(Math.exp(-0.5 * (FWHM_PER_SIGMA / 2) ** 2)).toBeCloseTo(0.5, 15);
  });

  it('Fano-limited FWHM at Mn Kα for w = 3.65 eV, F = 0.115 is ≈117 eV (2.3548·√(F·w·E), Fano, Phys. Rev. 72, 26 (1947); tol 1 eV)', () => {
    expect(Math.abs(fanoLimitFwhmEv(MN_KA_KEV, W, 0.115) - 117)).toBeLessThan(1);
    // with no read noise the law reduces to the Fano limit
    expect(fwhmEv(MN_KA_KEV, law(0, 0.115, 1))).toBeCloseTo(fanoLimitFwhmEv(MN_KA_KEV, W, 0.115), 10);
  });

  it('follows the law σ² = (w·N_r)²·n_pix + F·w·E (+ constant σ₀²), FWHM = 2.3548·σ (Fano 1947 term, read noise per pixel in quadrature: common practice)', () => {
    // n_pix constant here (the textbook law has no energy dependence of n_pix); 2.354820045 = 2√(2 ln 2).
    const written = (eKeV: number, nr: number, f: number, npix: number, s0: number) =>
      2.354820045 * Math.sqrt((W * nr) ** 2 * npix + f * W * eKeV * 1000 + s0 * s0);
    // 1e-9 relative: the 10-digit constant above is the only rounding.
    for (const [e, nr, f, npix, s0] of [[0.277, 3, 0.115, 4, 0], [1.487, 5.5, 0.12, 2, 7], [5.899, 2, 0.118, 3, 15], [12, 10, 0.1, 1, 0]])
      expect(Math.abs(fwhmEv(e, law(nr, f, npix, s0)) / written(e, nr, f, npix, s0) - 1), `${e} keV`).toBeLessThan(1e-9);
  });

  it('a 6 keV photon frees about 1,600 electrons in silicon (common practice, no source; 1,550–1,700)', () => {
    const n = electronsFreed(6, W);
    expect(n).toBeGreaterThan(1550);
    expect(n).toBeLessThan(1700);
  });

  it('~135 eV FWHM near 6 keV is typical of a good CCD with a few electrons of read noise (common practice, no source)', () => {
    // assumption: split events summing ~3 pixels at 6 keV (common practice, no source)
    const band: number[] = [];
    for (const nr of [3, 4, 5]) for (const f of [0.115, 0.12]) band.push(fwhmEv(6, law(nr, f, 3)));
    for (const v of band) {
      expect(v).toBeGreaterThanOrEqual(125);
      expect(v).toBeLessThanOrEqual(145);
    }
    // and 135 eV lies inside the band the law spans
    expect(Math.min(...band)).toBeLessThan(135);
    expect(Math.max(...band)).toBeGreaterThan(135);
  });

  it('at 0.3–0.5 keV a FWHM of 60–70 eV needs read noise below about 3 e⁻ RMS (common practice, no source)', () => {
    // assumption: soft events summed over ~4 pixels (2×2 island); "about 3" read as 3 ± 1 e⁻,
    // and the strictest corner (60 eV at 0.5 keV) must need less than 3 e⁻
    for (const e of [0.3, 0.4, 0.5])
      for (const fwhm of [60, 65, 70]) {
        const nr = readNoiseForFwhmE(e, fwhm, { pairEnergyEv: W, fano: 0.115, sigma0Ev: 0, pixelsPerEvent: { a: 4, bPerKeV: 0 } });
        expect(nr).toBeGreaterThan(2);
        expect(nr).toBeLessThan(4);
      }
    expect(readNoiseForFwhmE(0.5, 60, { pairEnergyEv: W, fano: 0.115, sigma0Ev: 0, pixelsPerEvent: { a: 4, bPerKeV: 0 } })).toBeLessThan(3);
    // a 6 e⁻ detector cannot reach 70 eV there
    expect(fwhmEv(0.4, law(6, 0.115, 4))).toBeGreaterThan(70);
  });

  it('read-noise inverse undoes the law, and is NaN below the Fano limit', () => {
    const p = law(4.2, 0.118, 2.5, 3);
    const f = fwhmEv(1.5, p);
    expect(readNoiseForFwhmE(1.5, f, p)).toBeCloseTo(4.2, 10);
    expect(readNoiseForFwhmE(1.5, fanoLimitFwhmEv(1.5, W, 0.118) - 1, p)).toBeNaN();
  });

  it('rejects a Fano factor outside (0, 1) naming the field', () => {
    for (const bad of [0, 1, -0.1, 1.2, NaN]) {
      try {
        checkResolutionParams(law(3, bad, 1));
        expect.unreachable();
      } catch (e) {
        expect(e).toBeInstanceOf(KilnInputError);
        expect((e as KilnInputError).where.field).toBe('fwhm.fano');
        expect((e as KilnInputError).oneLine()).toContain('(0, 1)');
      }
    }
  });

  it('rejects a line narrower than the Fano limit, naming line, value and limit', () => {
    const lines = [
      { line: 'Al-Ka', energyKeV: 1.487, fwhmEv: 80 },
      { line: 'Mn-Ka', energyKeV: MN_KA_KEV, fwhmEv: 110 },
    ];
    try {
      checkAboveFanoLimit(lines, W, 0.115, 'lines.csv');
      expect.unreachable();
    } catch (e) {
      const err = e as KilnInputError;
      expect(err).toBeInstanceOf(KilnInputError);
      expect(err.where.field).toBe('Mn-Ka.fwhmEv');
      expect(err.where.value).toBe(110);
      expect(err.oneLine()).toMatch(/lines\.csv.*Mn-Ka.*got 110.*≥ 11[67]\.\d eV/);
    }
    expect(() => checkAboveFanoLimit([lines[0]], W, 0.115)).not.toThrow();
  });
});

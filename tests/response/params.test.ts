import { describe, expect, it } from 'vitest';
import { buildParamsAt } from '../../generators/response/params.ts';
import { FWHM_PER_SIGMA, fwhmEv } from '../../generators/physics/resolution.ts';
import { KilnInputError } from '../../generators/errors.ts';
import { TOY_SILICON, gaussianOnlySpec, lineFit } from './spec-fixtures.ts';
import type { RedistributionSpec } from '../../generators/response/model-types.ts';

const res = { fano: 0.118, readNoiseE: 3.5, sigma0Ev: 0, pixelsPerEvent: { a: 1, bPerKeV: 0.4 } };
const fromLines: Partial<RedistributionSpec> = {
  fwhm: { source: 'line-fits', ...res },
  centroid: { source: 'line-fits' },
  tail: { source: 'line-fits' },
  shelf: { source: 'line-fits' },
};
// invented line fits of the demo detector
const lines = [
  lineFit('C-Ka', 0.277, { centroidKeV: 0.262, fwhmEv: 55, tailFraction: 0.2, tailScaleEv: 20, shelfFraction: 0.02 }),
  lineFit('O-Ka', 0.525, { centroidKeV: 0.515, fwhmEv: 62, tailFraction: 0.12, tailScaleEv: 25, shelfFraction: 0.015 }),
  lineFit('Al-Ka', 1.487, { centroidKeV: 1.484, fwhmEv: 85, tailFraction: 0.05, tailScaleEv: 30, shelfFraction: 0.01 }),
  lineFit('Mn-Ka', 5.899, { centroidKeV: 5.901, fwhmEv: 140, tailFraction: 0.01, tailScaleEv: 40, shelfFraction: 0.005 }),
];

describe('profile parameters from laws or line fits', () => {
  it('laws: FWHM law, energy scale with charge loss, tail law, shelf constant', () => {
    // Expected values are the laws as stated in model-types.ts, evaluated by hand at E = 1 keV:
    // centroid = E·(1 + g) + offset − loss·exp(−E/scale), tail fraction = f0·exp(−E/scale).
    const spec = gaussianOnlySpec({
      centroid: { source: 'law', gainError: 0.01, offsetEv: 5, chargeLossEv: 20, chargeLossScaleKeV: 0.5 },
      tail: { source: 'law', fractionAtZero: 0.3, fractionScaleKeV: 1, tailScaleEv: 30 },
      shelf: { source: 'law', fraction: 0.02 },
    });
    const p = buildParamsAt(spec, [])(1);
    expect(p.centroidKeV).toBeCloseTo(1.01 + 0.005 - 0.02 * Math.exp(-2), 12);
    expect(p.sigmaKeV * 1000 * FWHM_PER_SIGMA).toBeCloseTo(fwhmEv(1, { pairEnergyEv: 3.65, ...res }), 10);
    expect(p.tailFraction).toBeCloseTo(0.3 * Math.exp(-1), 12);
    expect(p.tailScaleKeV).toBeCloseTo(0.03, 12);
    expect(p.shelfFraction).toBe(0.02);
    expect(p.escapeFraction).toBe(0);
  });

  it('line fits: reproduced at the measured energies, monotone between, constant beyond (stated choice)', () => {
    const at = buildParamsAt(gaussianOnlySpec(fromLines), lines);
    for (const l of lines) {
      const p = at(l.energyKeV);
      expect(p.centroidKeV).toBeCloseTo(l.centroidKeV, 12);
      expect(p.sigmaKeV * 1000 * FWHM_PER_SIGMA).toBeCloseTo(l.fwhmEv, 9);
      expect(p.tailFraction).toBeCloseTo(l.tailFraction, 12);
      expect(p.shelfFraction).toBeCloseTo(l.shelfFraction, 12);
    }
    const mid = at(1);
    expect(mid.tailFraction).toBeLessThan(0.12);
    expect(mid.tailFraction).toBeGreaterThan(0.05);
    // beyond the last line: the tail fraction and the centroid shift stay at the Mn Kα values
    expect(at(10).tailFraction).toBeCloseTo(0.01, 12);
    expect((at(10).centroidKeV - 10) * 1000).toBeCloseTo(2, 9);
  });

  it('escape fraction only with escape on and above the edge; Si fluorescence only above the edge', () => {
    const at = buildParamsAt(gaussianOnlySpec({ escape: true, siFluorescenceFraction: 0.004 }), [], { silicon: TOY_SILICON });
    expect(at(1.8).escapeFraction).toBe(0);
    expect(at(1.8).fluorescenceFraction).toBe(0);
    expect(at(2).escapeFraction).toBeGreaterThan(0);
    expect(at(2).fluorescenceFraction).toBe(0.004);
  });

  it('rejects line fits narrower than the Fano limit, repeated energies, and missing lines', () => {
    const narrow = [...lines.slice(0, 3), lineFit('Mn-Ka', 5.899, { fwhmEv: 100 })];
    expect(() => buildParamsAt(gaussianOnlySpec(fromLines), narrow)).toThrow(/narrower than the Fano limit/);
    const twice = [lines[0], lineFit('O-Ka-2', 0.277)];
    try {
      buildParamsAt(gaussianOnlySpec(fromLines), twice);
      expect.unreachable();
    } catch (e) {
      expect(e).toBeInstanceOf(KilnInputError);
      expect((e as KilnInputError).where.field).toMatch(/energyKeV/);
    }
    expect(() => buildParamsAt(gaussianOnlySpec(fromLines), [])).toThrow(KilnInputError);
  });

  it('rejects bad law coefficients naming the field', () => {
    try {
      buildParamsAt(gaussianOnlySpec({ fwhm: { source: 'law', readNoiseE: 3, fano: 1.5, sigma0Ev: 0, pixelsPerEvent: { a: 1, bPerKeV: 0 } } }), []);
      expect.unreachable();
    } catch (e) {
      expect((e as KilnInputError).where.field).toBe('fwhm.fano');
    }
    expect(() => buildParamsAt(gaussianOnlySpec({ thresholdKeV: -1 }), [])).toThrow(KilnInputError);
  });
});

import { describe, expect, it } from 'vitest';
import { KilnInputError } from '../../generators/errors.ts';
import { materialMassAttenuationCm2g, sensorAbsorption, type SensorSpec } from '../../generators/physics/index.ts';
import { runPythonJson, runXraylibChecks } from '../support/python.ts';
import { relErr, xraylibMap } from './xraylib-ref.ts';

const SI = { formula: 'Si', densityGcm3: 2.329 }; // CRC Handbook of Chemistry and Physics, from memory
const PLAIN: SensorSpec = { material: SI, depletionUm: 45, partial: null };
// Invented demo values.
const WITH_PARTIAL: SensorSpec = { material: SI, depletionUm: 45, partial: { thicknessUm: 0.4, collectionAtSurface: 0.3 } };
const ENERGIES = [0.15, 0.3, 0.5, 0.8, 1.2, 1.7, 1.9, 3, 6, 9, 15];

describe.runIf(runXraylibChecks)('sensor absorption against xraylib (Debian python3-xraylib)', () => {
  it('without a partial layer: (μ_ph/μ)(1 − exp(−μd)), the slab absorption 1 − exp(−μd) of the photoabsorbed share', () => {
    const ref = xraylibMap<number>('xrl.CS_Photo(14, x) / xrl.CS_Total(14, x) * (1 - math.exp(-xrl.CS_Total(14, x) * 2.329 * 45e-4))', ENERGIES);
    const p = sensorAbsorption(PLAIN, Float64Array.from(ENERGIES));
    ENERGIES.forEach((e, i) => expect(relErr(p[i], ref[i]), `${e} keV`).toBeLessThan(0.005));
    // and it stays within the scattering share of the plain 1 − exp(−μd) (common practice, no source: scattering ≲ 10 % below 20 keV in Si)
    const slab = xraylibMap<number>('1 - math.exp(-xrl.CS_Total(14, x) * 2.329 * 45e-4)', ENERGIES);
    ENERGIES.forEach((e, i) => expect(relErr(p[i], slab[i]), `${e} keV`).toBeLessThan(0.1));
  });

  it('with a partial layer: the analytic depth integral matches a numerical one (Simpson rule in python)', () => {
    // Independent quadrature of ∫ μ_ph e^{−μz} c(z) dz, region by region (c is linear in the partial
    // layer, 1 beyond), with μ from xraylib. 2000 Simpson intervals per region: error ≪ 1e-6.
    const code = [
      'import json, sys, math',
      'import xraylib as xrl',
      'def simpson(f, a, b, n=2000):',
      '    h = (b - a) / n',
      '    return h / 3 * (f(a) + f(b) + sum((4 if i % 2 else 2) * f(a + i * h) for i in range(1, n)))',
      'p, d, c0, rho = 0.4e-4, 45e-4, 0.3, 2.329',
      'out = []',
      'for e in json.load(sys.stdin):',
      '    mu, ph = xrl.CS_Total(14, e) * rho, xrl.CS_Photo(14, e) * rho',
      '    part = simpson(lambda z: ph * math.exp(-mu * z) * (c0 + (1 - c0) * z / p), 0, p)',
      '    full = simpson(lambda z: ph * math.exp(-mu * z), p, p + d)',
      '    out.append(part + full)',
      'print(json.dumps(out))',
    ].join('\n');
    const ref = runPythonJson<number[]>('xraylib', code, ENERGIES);
    const p = sensorAbsorption(WITH_PARTIAL, Float64Array.from(ENERGIES));
    ENERGIES.forEach((e, i) => expect(relErr(p[i], ref[i]), `${e} keV`).toBeLessThan(0.005));
  });
});

describe('partial collection (model stated in detector.ts)', () => {
  it('reduces the soft efficiency and leaves hard X-rays almost unchanged', () => {
    const E = Float64Array.of(0.3, 0.5, 6);
    const a = sensorAbsorption(PLAIN, E);
    const b = sensorAbsorption(WITH_PARTIAL, E);
    expect(b[0]).toBeLessThan(0.9 * a[0]);
    expect(b[1]).toBeLessThan(a[1]);
    expect(relErr(b[2], a[2])).toBeLessThan(0.01);
  });
  it('full collection at the surface equals a thicker fully depleted layer', () => {
    const E = Float64Array.of(0.3, 2, 8);
    const a = sensorAbsorption({ material: SI, depletionUm: 45.4, partial: null }, E);
    const b = sensorAbsorption({ ...WITH_PARTIAL, partial: { thicknessUm: 0.4, collectionAtSurface: 1 } }, E);
    E.forEach((_, i) => expect(b[i]).toBeCloseTo(a[i], 12));
  });
  it('a very thin partial layer: the collection loss is right on both sides of the series switch', () => {
    // Loss from a partial layer with zero collection at the surface (c = z/p), against full collection:
    // (μ_ph/μ)·[(1 − e^{−x}) − (1/x)∫₀^x u e^{−u} du], x = μp (integration by parts, mathematics, no
    // source). The bracket is evaluated here by its Taylor series x/2 − x²/6 + x³/24 − x⁴/120 + x⁵/720,
    // exact to < 1e-15 relative for x ≤ 1e-2; x from 1e-7 to 1e-2 spans the code's series/closed-form switch.
    const eKeV = 10;
    const E = Float64Array.of(eKeV);
    const mu = materialMassAttenuationCm2g('Si', eKeV, 'total') * SI.densityGcm3;
    const muPh = materialMassAttenuationCm2g('Si', eKeV, 'photo') * SI.densityGcm3;
    const absorbed = (t: number, c0: number) => sensorAbsorption({ ...WITH_PARTIAL, partial: { thicknessUm: t, collectionAtSurface: c0 } }, E)[0];
    for (const x of [1e-7, 1e-6, 3e-5, 9e-5, 1.1e-4, 3e-4, 1e-3, 1e-2]) {
      const tUm = (x / mu) * 1e4;
      const bracket = x / 2 - x ** 2 / 6 + x ** 3 / 24 - x ** 4 / 120 + x ** 5 / 720;
      const want = (muPh / mu) * bracket;
      const got = absorbed(tUm, 1) - absorbed(tUm, 0);
      // the difference of two O(1) doubles carries ~1e-16 absolute error: 1e-6 relative is ample at x ≥ 1e-7
      expect(Math.abs(got / want - 1), `x = ${x}`).toBeLessThan(1e-6);
    }
  });
});

describe('bad sensors', () => {
  const cases: [string, SensorSpec, string][] = [
    ['zero depletion', { ...PLAIN, depletionUm: 0 }, 'sensor.depletionUm'],
    ['partial thickness 0', { ...PLAIN, partial: { thicknessUm: 0, collectionAtSurface: 0.5 } }, 'sensor.partial.thicknessUm'],
    ['collection 1.5', { ...PLAIN, partial: { thicknessUm: 1, collectionAtSurface: 1.5 } }, 'sensor.partial.collectionAtSurface'],
    ['negative density', { ...PLAIN, material: { formula: 'Si', densityGcm3: -2 } }, 'sensor.material.densityGcm3'],
  ];
  it.each(cases)('%s → KilnInputError', (_, s, field) => {
    try {
      sensorAbsorption(s, Float64Array.of(1));
      expect.unreachable();
    } catch (e) {
      expect(e).toBeInstanceOf(KilnInputError);
      expect((e as KilnInputError).where.field).toBe(field);
    }
  });
});

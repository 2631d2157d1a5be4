/**
 * One collection model for ARF and RMF: partial-charge events of a partially collecting layer.
 * The component's amplitude and shape are checked against a direct numerical integration over
 * absorption depth in this test (composite Simpson over z of μe^{−μz}·Φ((x − c(z)E)/σ), with
 * c(z) = c0 + (1 − c0)z/p, independent of the closed form); the mean collected charge against
 * the sensor model's closed form (detector.ts); probability accounting of a whole matrix.
 */
import { describe, expect, it } from 'vitest';
import {
  componentCdf,
  efficiencyBreakdown,
  materialMassAttenuationCm2g,
  partialChargeShape,
  profileComponents,
  sensorAbsorption,
  type SensorSpec,
} from '../../generators/physics/index.ts';
import { normalCdf } from '../../generators/physics/special.ts';
import { buildParamsAt, buildRedistribution } from '../../generators/response/index.ts';
import { CHANNELS, META, gaussianOnlySpec } from './spec-fixtures.ts';

// Invented back-illuminated sensor (the demo's Tarn-B values).
const SENSOR: SensorSpec = { material: { formula: 'Si', densityGcm3: 2.329 }, depletionUm: 40, partial: { thicknessUm: 0.3, collectionAtSurface: 0.4 } };
const CM_PER_UM = 1e-4;

function simpson(f: (z: number) => number, a: number, b: number, n = 20_000): number {
  const h = (b - a) / n;
  let s = f(a) + f(b);
  for (let i = 1; i < n; i++) s += (i % 2 ? 4 : 2) * f(a + i * h);
  return (s * h) / 3;
}

const muAt = (e: number) => materialMassAttenuationCm2g('Si', e, 'total') * SENSOR.material.densityGcm3;

describe('partial-charge component vs direct integration over depth', () => {
  const spec = gaussianOnlySpec({ tail: { source: 'collection' }, thresholdKeV: 0.1 });
  const paramsAt = buildParamsAt(spec, [], { sensor: SENSOR });
  const p = SENSOR.partial!;

  for (const e of [0.3, 0.525, 1.0, 1.49, 3.0]) {
    it(`at ${e} keV: amplitude and CDF of the partial events`, () => {
      const mu = muAt(e);
      const pCm = p.thicknessUm * CM_PER_UM;
      const all = simpson((z) => mu * Math.exp(-mu * z), 0, (p.thicknessUm + SENSOR.depletionUm) * CM_PER_UM, 200_000);
      const params = paramsAt(e);
      const comps = profileComponents(params, { shelfLowKeV: 0 }, e);
      const partial = comps.find((c) => c.kind === 'partial')!;
      expect(partial).toBeDefined();
      const direct = simpson((z) => mu * Math.exp(-mu * z), 0, pCm) / all;
      expect(Math.abs(partial.fraction / direct - 1)).toBeLessThan(1e-6);
      const c = (z: number) => p.collectionAtSurface + ((1 - p.collectionAtSurface) * z) / pCm;
      const s = params.sigmaKeV;
      const F = componentCdf(partial);
      const full = params.centroidKeV;
      for (const x of [0.2 * full, p.collectionAtSurface * full, 0.55 * full, 0.8 * full, full - s, full + 3 * s]) {
        const ref = simpson((z) => mu * Math.exp(-mu * z) * normalCdf((x - c(z) * full) / s), 0, pCm) / all;
        expect(Math.abs(partial.fraction * F(x) - ref)).toBeLessThan(1e-7 + 1e-6 * ref);
      }
    });
  }

  it('the mean collected charge of all absorbed photons is the sensor model’s collected fraction', () => {
    for (const e of [0.3, 0.7, 1.5]) {
      const mu = muAt(e);
      const pCm = p.thicknessUm * CM_PER_UM;
      const shape = partialChargeShape(mu, p, SENSOR.depletionUm);
      const mean = simpson((z) => mu * Math.exp(-mu * z) * (p.collectionAtSurface + ((1 - p.collectionAtSurface) * z) / pCm), 0, pCm);
      const deep = Math.exp(-mu * pCm) * -Math.expm1(-mu * SENSOR.depletionUm * CM_PER_UM);
      const at = Float64Array.of(e);
      const ratio = sensorAbsorption(SENSOR, at)[0] / sensorAbsorption(SENSOR, at, { allAbsorbed: true })[0];
      expect(ratio).toBeCloseTo((mean + deep) / -Math.expm1(-mu * (pCm + SENSOR.depletionUm * CM_PER_UM)), 6);
      expect(shape.fraction).toBeGreaterThan(0);
    }
  });

  it('the share in the layer falls with energy and is flat (a shelf) where the layer is thin to the photon', () => {
    const soft = partialChargeShape(muAt(0.3), p, SENSOR.depletionUm);
    const hard = partialChargeShape(muAt(6), p, SENSOR.depletionUm);
    expect(soft.fraction).toBeGreaterThan(10 * hard.fraction);
    // density varies by e^{−rate} across the layer: under 5 % at 6 keV
    expect(hard.rateAcrossLayer).toBeLessThan(0.05);
    expect(soft.rateAcrossLayer).toBeGreaterThan(1);
  });
});

describe('a matrix with the collection model', () => {
  it('rows + threshold and outside losses = 1; the ARF counts every absorbed photon', () => {
    const spec = gaussianOnlySpec({ tail: { source: 'collection' }, thresholdKeV: 0.15 });
    const stack = { filters: [], contamination: null, surface: [], sensor: SENSOR };
    const r = buildRedistribution({ spec, lineFits: [], energy: { minKeV: 0.2, maxKeV: 3, bins: 140, spacing: 'linear' }, channels: CHANNELS, meta: META, stack });
    r.rmf.rows.forEach((row, i) => {
      const s = row.matrix.reduce((a, b) => a + b, 0);
      expect(Math.abs(s + r.losses.thresholdLoss[i] + r.losses.outsideLoss[i] + r.losses.droppedByCut[i] - 1)).toBeLessThan(1e-5);
    });
    // at 0.3 keV partial events reach down to 0.4 × 0.3 = 0.12 keV, below the 0.15 keV threshold:
    expect(r.losses.thresholdLoss[3]).toBeGreaterThan(0.01);
    const e = Float64Array.of(0.3);
    const all = efficiencyBreakdown(stack, e, null, { partialChargeInMatrix: true }).detectorQE[0];
    const collected = efficiencyBreakdown(stack, e, null).detectorQE[0];
    expect(all).toBeGreaterThan(collected);
  });

  it('photons in the layer are partial events only: shelf, escape and fluorescence share the rest', () => {
    // Probability accounting (common practice, no source): each absorbed photon gives one event,
    // so the components' fractions add up to 1 and the fully collected ones share 1 − partial.
    const spec = gaussianOnlySpec({ tail: { source: 'collection' }, shelf: { source: 'law', fraction: 0.015 }, thresholdKeV: 0.1 });
    const at = buildParamsAt(spec, [], { sensor: SENSOR });
    for (const e of [0.3, 0.6, 1.5]) {
      const q = at(e);
      const share = q.partial!.fraction;
      expect(share).toBeGreaterThan(0.01);
      expect(Math.abs(q.shelfFraction - 0.015 * (1 - share))).toBeLessThan(1e-12);
      const total = profileComponents(q, { shelfLowKeV: 0 }, e).reduce((a, c) => a + c.fraction, 0);
      expect(Math.abs(total - 1)).toBeLessThan(1e-9);
    }
  });

  it('refuses the collection model without a partial layer (one clear error)', () => {
    try {
      buildParamsAt(gaussianOnlySpec({ tail: { source: 'collection' } }), [], { sensor: { ...SENSOR, partial: null } });
      expect.unreachable();
    } catch (err) {
      expect(String((err as Error).message)).toMatch(/tail.source/);
    }
  });
});

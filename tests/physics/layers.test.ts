import { describe, expect, it } from 'vitest';
import { KilnInputError } from '../../generators/errors.ts';
import { layerTransmission, materialTransmission, type LayerSpec } from '../../generators/physics/index.ts';
import { runXraylibChecks } from '../support/python.ts';
import { xraylibMap } from './xraylib-ref.ts';

const ENERGIES = [0.2, 0.35, 0.52, 0.7, 1.0, 1.49, 2.0, 4.5, 6.4, 10];
const LAYERS: LayerSpec[] = [
  { name: 'optical blocking filter', kind: 'filter', material: { formula: 'C22H10N2O5', densityGcm3: 1.42 }, thicknessUm: 0.2 },
  { name: 'aluminium coat', kind: 'filter', material: { formula: 'Al', densityGcm3: 2.699 }, thicknessUm: 0.1 },
  { name: 'gate oxide', kind: 'surface', material: { formula: 'SiO2', densityGcm3: 2.2 }, thicknessUm: 0.05 },
  { name: 'nitride', kind: 'surface', material: { formula: 'Si3N4', densityGcm3: 3.1 }, thicknessUm: 0.03 },
];

describe.runIf(runXraylibChecks)('layer transmission against exp(−μρt) from xraylib (Debian python3-xraylib)', () => {
  it.each(LAYERS.map((l) => [l.name, l] as const))('%s', (_, layer) => {
    const cases = ENERGIES.map((e) => [layer.material.formula, e, layer.material.densityGcm3, layer.thicknessUm * 1e-4]);
    const ref = xraylibMap<(string | number)[]>('math.exp(-xrl.CS_Total_CP(x[0], x[1]) * x[2] * x[3])', cases);
    const t = layerTransmission(layer, Float64Array.from(ENERGIES));
    ENERGIES.forEach((e, i) => {
      // δ on μ becomes δ·μρt on ln T: bound by the optical depth, no floor (δ = 1.5e-3, measured ≤ 8.3e-4;
      // see tests/physics/efficiency.test.ts).
      const tau = -Math.log(ref[i]);
      expect(Math.abs(Math.log(t[i] / ref[i])), `${layer.name} at ${e} keV`).toBeLessThanOrEqual(1.5e-3 * tau + 1e-12);
    });
  });
});

describe('layer errors name the layer, the field, the value and the allowed range', () => {
  const base = LAYERS[0];
  const E = Float64Array.of(1);
  const cases: [string, LayerSpec, string, unknown][] = [
    ['zero thickness', { ...base, thicknessUm: 0 }, 'thicknessUm', 0],
    ['negative thickness', { ...base, thicknessUm: -1 }, 'thicknessUm', -1],
    ['NaN thickness', { ...base, thicknessUm: Number.NaN }, 'thicknessUm', Number.NaN],
    ['zero density', { ...base, material: { formula: 'Al', densityGcm3: 0 } }, 'densityGcm3', 0],
    ['density in kg/m³', { ...base, material: { formula: 'Al', densityGcm3: 2699 } }, 'densityGcm3', 2699],
    ['bad formula', { ...base, material: { formula: 'Al2Q', densityGcm3: 1 } }, 'material.formula', 'Al2Q'],
  ];
  it.each(cases)('%s', (_, layer, field, value) => {
    let err: unknown;
    try {
      layerTransmission(layer, E);
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(KilnInputError);
    const w = (err as KilnInputError).where;
    expect(w.field).toContain(`layer "${base.name}"`);
    expect(w.field).toContain(field);
    expect(w.value).toEqual(value);
    expect((err as KilnInputError).oneLine()).toMatch(/expected/);
  });

  it('a zero-thickness material (e.g. contamination not yet grown) transmits everything', () => {
    expect(Array.from(materialTransmission({ formula: 'CH2', densityGcm3: 1 }, 0, Float64Array.of(0.3, 1)))).toEqual([1, 1]);
  });
});

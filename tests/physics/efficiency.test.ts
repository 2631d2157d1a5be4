import { describe, expect, it } from 'vitest';
import { KilnInputError } from '../../generators/errors.ts';
import { efficiencyBreakdown, efficiencyTable } from '../../generators/physics/index.ts';
import { runPythonJson, runXraylibChecks } from '../support/python.ts';

import { DEMO_STACK } from './stack-fixture.ts';

const ENERGIES = [0.2, 0.3, 0.5, 0.8, 1.0, 1.5, 2.0, 3.0, 5.9, 8.0, 12.0];
const DATE = '2027-07-01';

describe.runIf(runXraylibChecks)('stack efficiency against an independent xraylib computation (Debian python3-xraylib)', () => {
  it('each component and the product', () => {
    // Everything recomputed in python from CS_Total_CP / CS_Photo and the stated model; dates by datetime.
    const code = [
      'import json, sys, math, datetime',
      'import xraylib as xrl',
      's = json.load(sys.stdin)',
      'st, es = s["stack"], s["energies"]',
      'law = st["contamination"]["law"]',
      'days = (datetime.date.fromisoformat(s["date"]) - datetime.date.fromisoformat(law["referenceDate"])).days',
      'tc = max(0.0, law["thicknessAtReferenceUm"] + law["rateUmPerYear"] * days / 365.25)',
      'layers = st["filters"] + [dict(name=st["contamination"]["name"], material=st["contamination"]["material"], thicknessUm=tc)] + st["surface"]',
      'def T(l, e): return math.exp(-xrl.CS_Total_CP(l["material"]["formula"], e) * l["material"]["densityGcm3"] * l["thicknessUm"] * 1e-4)',
      'sen = st["sensor"]; rho = sen["material"]["densityGcm3"]; p = sen["partial"]["thicknessUm"] * 1e-4; c0 = sen["partial"]["collectionAtSurface"]; d = sen["depletionUm"] * 1e-4',
      'def S(e):',
      '    mu, ph = xrl.CS_Total(14, e) * rho, xrl.CS_Photo(14, e) * rho',
      '    n = 4000; h = p / n',
      '    part = h / 3 * sum((1 if i in (0, n) else (4 if i % 2 else 2)) * ph * math.exp(-mu * i * h) * (c0 + (1 - c0) * i * h / p) for i in range(n + 1))',
      '    return part + ph / mu * math.exp(-mu * p) * (1 - math.exp(-mu * d))',
      'rows = [[T(l, e) for e in es] for l in layers] + [[S(e) for e in es]]',
      'print(json.dumps(dict(tc=tc, rows=rows)))',
    ].join('\n');
    const ref = runPythonJson<{ tc: number; rows: number[][] }>('xraylib', code, { stack: DEMO_STACK, energies: ENERGIES, date: DATE });
    const b = efficiencyBreakdown(DEMO_STACK, Float64Array.from(ENERGIES), DATE);
    expect(b.contaminationUm).toBeCloseTo(ref.tc, 12);
    expect(b.components.map((c) => c.kind)).toEqual(['filter', 'filter', 'contamination', 'surface', 'surface', 'sensor']);
    // A relative error δ in μ/ρ moves ln T of a layer by δ·τ (τ its optical depth), so the allowance
    // scales with τ and a thin layer is held as tightly as its absorption: no flat floor. Measured
    // δ ≤ 8.3e-4 (log-log table vs xraylib at these energies, compounds near the C/N/O edges);
    // allowed LAYER_DELTA. The sensor's absorbed share is bounded by δ of μ_photo/μ_total and of
    // 1 − e^(−μd): measured ≤ 1.1e-4, allowed SENSOR_DELTA.
    const LAYER_DELTA = 1.5e-3;
    const SENSOR_DELTA = 3e-4;
    const allowance = (k: number, i: number) => (b.components[k].kind === 'sensor' ? SENSOR_DELTA : LAYER_DELTA * -Math.log(ref.rows[k][i]) + 1e-12);
    b.components.forEach((c, k) =>
      ENERGIES.forEach((e, i) => {
        expect(Math.abs(Math.log(c.values[i] / ref.rows[k][i])), `${c.name} ${e} keV`).toBeLessThanOrEqual(allowance(k, i));
      }),
    );
    ENERGIES.forEach((e, i) => {
      const prod = ref.rows.reduce((s, r) => s * r[i], 1);
      const total = b.components.reduce((s, _, k) => s + allowance(k, i), 0);
      expect(Math.abs(Math.log(b.detectorQE[i] / prod)), `QE ${e} keV`).toBeLessThanOrEqual(total);
    });
  });
});

describe('efficiency bookkeeping', () => {
  it('detectorQE is the product of the components; contamination grows with time and lowers soft efficiency', () => {
    const E = Float64Array.from(ENERGIES);
    const early = efficiencyBreakdown(DEMO_STACK, E, '2025-01-01');
    const late = efficiencyBreakdown(DEMO_STACK, E, '2030-01-01');
    for (let i = 0; i < E.length; i++) {
      expect(early.detectorQE[i]).toBeCloseTo(early.components.reduce((s, c) => s * c.values[i], 1), 14);
    }
    expect(late.contaminationUm).toBeGreaterThan(early.contaminationUm);
    expect(late.detectorQE[1]).toBeLessThan(early.detectorQE[1]);
  });

  it('efficiencyTable lists formula, density and thickness of every component', () => {
    const t = efficiencyTable(DEMO_STACK, Float64Array.of(1, 6), DATE);
    expect(t.components.map((c) => [c.name, c.formula, c.densityGcm3])).toEqual([
      ['blocking film', 'C22H10N2O5', 1.42],
      ['blocking metal', 'Al', 2.699],
      ['molecular film', 'C8H8', 1.0],
      ['oxide', 'SiO2', 2.2],
      ['gates', 'Si', 2.329],
      ['sensor', 'Si', 2.329],
    ]);
    expect(t.components[2].thicknessUm).toBeCloseTo(t.contaminationUm, 14);
    expect(t.components[5]).toMatchObject({ thicknessUm: 40, partialUm: 0.2, collectionAtSurface: 0.5 });
    expect(t.total).toHaveLength(2);
    expect(JSON.parse(JSON.stringify(t))).toEqual(t);
  });

  it('a stack without contamination needs no date', () => {
    const s = { ...DEMO_STACK, contamination: null };
    expect(efficiencyBreakdown(s, Float64Array.of(1), null).contaminationUm).toBe(0);
  });
});

describe('bad stacks and dates', () => {
  it('contamination without a date', () => {
    expect(() => efficiencyBreakdown(DEMO_STACK, Float64Array.of(1), null)).toThrow(/observation date is needed for contamination layer "molecular film"/);
  });
  it('bad date', () => {
    expect(() => efficiencyBreakdown(DEMO_STACK, Float64Array.of(1), '2027-02-29')).toThrow(KilnInputError);
  });
  it('a bad layer is named', () => {
    const s = { ...DEMO_STACK, surface: [{ ...DEMO_STACK.surface[0], thicknessUm: -0.1 }] };
    expect(() => efficiencyBreakdown(s, Float64Array.of(1), DATE)).toThrow(/layer "oxide": thickness must be positive/);
  });
  it('energy outside the table', () => {
    expect(() => efficiencyBreakdown(DEMO_STACK, Float64Array.of(0.05), DATE)).toThrow(/photon energy 0.05 keV is outside the cross-section table/);
  });
  it('not a stack', () => {
    expect(() => efficiencyBreakdown({} as never, Float64Array.of(1), DATE)).toThrow(KilnInputError);
  });
});

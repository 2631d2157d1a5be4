/**
 * Si fluorescence from the surface layers of a front-illuminated stack, against an independent
 * computation in python with Debian's python3-xraylib (CS_Photo, CS_Total_CP, FluorYield,
 * JumpFactor, LineEnergy) and scipy's adaptive quadrature (scipy.integrate.quad) for the depth and
 * angle integrals. Tolerance 0.1 %: our cross sections are xraylib's, tabulated with ≤ 0.1 %
 * log-log interpolation error (generators/physics/data provenance); measured ≤ 2e-4.
 */
import { describe, expect, it } from 'vitest';
import { efficiencyBreakdown, stackFluorescence, type DetectorStack } from '../../generators/physics/index.ts';
import { fluorescenceShareFn } from '../../generators/response/index.ts';
import { runPythonJson } from '../support/python.ts';
import { runXraylibChecks } from '../support/python.ts';

// The demo's invented front-illuminated stack (content/instruments/quillon-tarncam, Tarn-F).
const FI: DetectorStack = {
  filters: [
    { name: 'film', kind: 'filter', material: { formula: 'C22H10N2O5', densityGcm3: 1.42 }, thicknessUm: 0.2 },
    { name: 'metal', kind: 'filter', material: { formula: 'Al', densityGcm3: 2.7 }, thicknessUm: 0.08 },
  ],
  contamination: null,
  surface: [
    { name: 'oxide', kind: 'surface', material: { formula: 'SiO2', densityGcm3: 2.2 }, thicknessUm: 0.2 },
    { name: 'gates', kind: 'surface', material: { formula: 'Si', densityGcm3: 2.33 }, thicknessUm: 0.3 },
    { name: 'nitride', kind: 'surface', material: { formula: 'Si3N4', densityGcm3: 3.17 }, thicknessUm: 0.08 },
  ],
  sensor: { material: { formula: 'Si', densityGcm3: 2.329 }, depletionUm: 45, partial: null },
};
const ENERGIES = [1.85, 2.2, 3, 4.5, 6, 8, 10];

const PY = `
import json, sys, math
import xraylib as x
from scipy.integrate import quad
d = json.load(sys.stdin)
si = 14
ka = x.LineEnergy(si, x.KL3_LINE)
edge = x.EdgeEnergy(si, x.K_SHELL)
per_k = (1 - 1 / x.JumpFactor(si, x.K_SHELL)) * x.FluorYield(si, x.K_SHELL)
def mu(layer, e):  # 1/um
    return x.CS_Total_CP(layer['formula'], e) * layer['density'] * layer['um'] * 1e-4 / layer['um']
def wsi(formula):
    c = x.CompoundParser(formula)
    for z, w in zip(c['Elements'], c['massFractions']):
        if z == si: return w
    return 0.0
sensor = d['sensor']
tau_s = x.CS_Total_CP(sensor['formula'], ka) * sensor['density'] * sensor['um'] * 1e-4
def hemi(a):
    return 0.5 * quad(lambda eta: math.exp(-a / eta) * (1 - math.exp(-tau_s / eta)) if eta > 0 else 0.0, 0, 1, limit=200)[0]
out = []
for e in d['energies']:
    if e <= edge:
        out.append(0.0); continue
    front = 1.0
    for f in d['filters']:
        front *= math.exp(-mu(f, e) * f['um'])
    total = 0.0
    layers = d['surface']
    for i, L in enumerate(layers):
        w = wsi(L['formula'])
        behind = sum(mu(M, ka) * M['um'] for M in layers[i + 1:])
        if w > 0:
            tau_si = L['density'] * w * x.CS_Photo(si, e) * 1e-4
            m, mk, t = mu(L, e), mu(L, ka), L['um']
            total += front * per_k * quad(lambda s: tau_si * math.exp(-m * s) * hemi(mk * (t - s) + behind), 0, t, limit=100)[0]
        front *= math.exp(-mu(L, e) * L['um'])
    out.append(total)
print(json.dumps(out))
`;

const asPy = (l: { material: { formula: string; densityGcm3: number }; thicknessUm: number }) => ({ formula: l.material.formula, density: l.material.densityGcm3, um: l.thicknessUm });

describe.runIf(runXraylibChecks)('Si fluorescence from the stack vs xraylib + scipy', () => {
  it('F(E) per incident photon within 0.1 % (measured ≤ 2e-4) at 1.85–10 keV, zero below the K edge', () => {
    const ref = runPythonJson<number[]>('xraylib', PY, {
      energies: ENERGIES,
      filters: FI.filters.map(asPy),
      surface: FI.surface.map(asPy),
      sensor: { formula: 'Si', density: 2.329, um: 45 },
    });
    const ours = stackFluorescence(FI, Float64Array.from(ENERGIES), null);
    ENERGIES.forEach((e, i) => {
      expect(ref[i]).toBeGreaterThan(0);
      expect(Math.abs(ours[i] / ref[i] - 1), `${e} keV: ${ours[i]} vs ${ref[i]}`).toBeLessThan(1e-3);
    });
    expect(stackFluorescence(FI, Float64Array.of(1.7, 1.0), null).every((v) => v === 0)).toBe(true);
  });
});

describe('Si fluorescence from the stack: shape', () => {
  it('falls steeply with energy (the fault of a constant fraction), and its share of events is of the reviewed size', () => {
    const share = fluorescenceShareFn(FI);
    const s = [2.2, 6, 10].map(share);
    expect(s[0]).toBeGreaterThan(5 * s[1]);
    // Independent estimates quoted in the issue for this stack (a reviewer's, method not stated):
    // ~0.6 % at 2.2 keV, 0.035 % at 6 keV, 0.008 % at 10 keV per photon. Per incident photon we get
    // 0.41 %, 0.031 %, 0.0071 %: agreement within a factor 2 is all their unstated definition allows.
    const perIncident = stackFluorescence(FI, Float64Array.of(2.2, 6, 10), null);
    [0.006, 0.00035, 0.00008].forEach((v, i) => {
      expect(perIncident[i] / v).toBeGreaterThan(0.5);
      expect(perIncident[i] / v).toBeLessThan(2);
    });
  });

  it('a stack without silicon in front of the sensor gives none; filters scale F and QE alike', () => {
    const noSi: DetectorStack = { ...FI, surface: [{ name: 'poly', kind: 'surface', material: { formula: 'C22H10N2O5', densityGcm3: 1.42 }, thicknessUm: 0.2 }] };
    expect(stackFluorescence(noSi, Float64Array.of(3, 6), null).every((v) => v === 0)).toBe(true);
    const bare = { ...FI, filters: [] };
    const e = Float64Array.of(3);
    const ratioWith = stackFluorescence(FI, e, null)[0] / efficiencyBreakdown(FI, e, null).detectorQE[0];
    const ratioBare = stackFluorescence(bare, e, null)[0] / efficiencyBreakdown(bare, e, null).detectorQE[0];
    expect(ratioWith / ratioBare).toBeCloseTo(1, 10);
  });
});

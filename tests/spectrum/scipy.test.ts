/**
 * The same C-statistic minimised by Debian's python3-scipy (scipy.optimize.minimize,
 * Nelder–Mead, tight tolerances) on the same data and model gives the same best fit within 1e-3
 * of the error. Python builds the model on its own: the matrix and areas read with astropy, the
 * power law integrated over each bin in closed form, the line with scipy.special.erf.
 */
import { describe, expect, it } from 'vitest';
import { binnedPhotonFlux, DEFAULT_ABUNDANCES, fitSpectrum, foldCounts, poissonDraws, symmetricError, type SourceModel } from '../../generators/spectrum/index.ts';
import { runPythonJson, runScipyChecks } from '../support/python.ts';
import { ARF_FI0, demoResponse, RMF_FI0 } from './helpers.ts';

const TRUTH: SourceModel = {
  columnCm2: 0,
  abundances: DEFAULT_ABUNDANCES,
  components: [
    { kind: 'power-law', name: 'pl', photonIndex: 1.6, normAt1KeV: 3e-3 },
    { kind: 'gaussian-line', name: 'line', energyKeV: 6.1, sigmaKeV: 0.03, photonFluxCm2s: 1e-3 },
  ],
};
const FREE = ['pl.photonIndex', 'pl.normAt1KeV', 'line.photonFluxCm2s'];
const EXPOSURE_S = 20000;

const PY = `
import json, sys
import numpy as np
from astropy.io import fits
from scipy.optimize import minimize
from scipy.special import erf
p = json.load(sys.stdin)
with fits.open(p["rmf"]) as r, fits.open(p["arf"]) as a:
    m = r["MATRIX"].data
    first = int(r["MATRIX"].header.get("TLMIN4", 1))
    nch = int(r["MATRIX"].header["DETCHANS"])
    lo = np.array(m["ENERG_LO"], dtype=float); hi = np.array(m["ENERG_HI"], dtype=float)
    R = np.zeros((len(m), nch))
    for i in range(len(m)):
        k = 0
        vals = np.array(m["MATRIX"][i], dtype=float)
        for f, n in zip(np.atleast_1d(m["F_CHAN"][i]), np.atleast_1d(m["N_CHAN"][i])):
            R[i, f - first:f - first + n] = vals[k:k + n]
            k += n
    area = np.array(a["SPECRESP"].data["SPECRESP"], dtype=float)
d = np.array(p["counts"], dtype=float)
E0, S0 = p["lineEnergy"], p["lineSigma"]
T = p["exposure"]
def model(th):
    g, K, F = th
    pl = K * (hi ** (1 - g) - lo ** (1 - g)) / (1 - g)
    ln = 0.5 * F * (erf((hi - E0) / (S0 * np.sqrt(2))) - erf((lo - E0) / (S0 * np.sqrt(2))))
    return T * ((pl + ln) * area) @ R
def C(th):
    mm = np.maximum(model(th), 1e-10)
    t = np.where(d > 0, mm - d + d * np.log(np.where(d > 0, d, 1) / mm), mm)
    return 2 * t.sum()
best = np.array(p["best"]); err = np.array(p["errors"])
x0 = np.array([0.5, -0.5, 0.5])
res = minimize(lambda x: C(best + x * err), x0, method="Nelder-Mead", options={"xatol": 1e-7, "fatol": 1e-11, "maxiter": 20000, "maxfev": 40000})
print(json.dumps({"x": list(best + res.x * err), "c": float(res.fun), "ours": float(C(best)), "success": bool(res.success)}))
`;

describe('scipy.optimize agrees with our C-stat fit', () => {
  it.runIf(runScipyChecks)('same best fit within 1e-3 σ on a seeded spectrum of the demo response', () => {
    const { response, grid } = demoResponse();
    const expected = foldCounts(response, binnedPhotonFlux(grid, TRUTH), EXPOSURE_S);
    const counts = poissonDraws(expected, 2026);
    const start: SourceModel = { ...TRUTH, components: [{ ...TRUTH.components[0], photonIndex: 1.3 } as SourceModel['components'][number], { ...TRUTH.components[1], photonFluxCm2s: 2e-3 } as SourceModel['components'][number]] };
    const fit = fitSpectrum({ response, grid, counts, exposureS: EXPOSURE_S }, { model: start, free: FREE }, { errors: false });
    expect(fit.converged).toBe(true);
    const pars = FREE.map((n) => fit.parameters.find((p) => p.name === n)!);
    const ref = runPythonJson<{ x: number[]; c: number; ours: number; success: boolean }>('scipy', PY, {
      rmf: RMF_FI0,
      arf: ARF_FI0,
      counts: Array.from(counts),
      exposure: EXPOSURE_S,
      lineEnergy: 6.1,
      lineSigma: 0.03,
      best: pars.map((p) => p.value),
      errors: pars.map((p) => symmetricError(p)),
    });
    expect(ref.success).toBe(true);
    // Python's C at our optimum is our C (same statistic, same model) to 1e-6 absolute.
    expect(Math.abs(ref.ours - fit.cstat)).toBeLessThan(1e-6);
    pars.forEach((p, k) => {
      const shiftSigma = Math.abs(ref.x[k] - p.value) / symmetricError(p);
      console.info(`scipy vs kiln, ${p.name}: ${shiftSigma.toExponential(2)} σ`);
      expect(shiftSigma, p.name).toBeLessThan(1e-3);
    });
  });
});

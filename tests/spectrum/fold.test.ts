/**
 * Folding: the sum of expected counts equals T Σ_E (∫_bin K E^−Γ dE) · ARF_E · Σ_c R(c, E), with
 * the bin integral in closed form (calculus: ∫ E^−Γ = E^{1−Γ}/(1 − Γ)) and the row sums and areas
 * read from the published files with astropy — to 1e-9 relative. Per-band rates add up to the
 * total when the bands tile the channel range.
 */
import { describe, expect, it } from 'vitest';
import { bandRates, binnedPhotonFlux, foldCounts, sum, DEFAULT_ABUNDANCES, type SourceModel } from '../../generators/spectrum/index.ts';
import { runAstropyChecks, runPythonJson } from '../support/python.ts';
import { ARF_FI0, demoResponse, RMF_FI0 } from './helpers.ts';

const MODEL: SourceModel = { columnCm2: 0, abundances: DEFAULT_ABUNDANCES, components: [{ kind: 'power-law', name: 'pl', photonIndex: 1.7, normAt1KeV: 0.01 }] };
const EXPOSURE_S = 10000;

describe('folding', () => {
  it.runIf(runAstropyChecks)('total expected counts = T Σ ∫source × ARF × row sum (closed-form integral, astropy row sums) to 1e-9', () => {
    const { response, grid } = demoResponse();
    const counts = foldCounts(response, binnedPhotonFlux(grid, MODEL), EXPOSURE_S);
    const code = [
      'import json, sys',
      'from astropy.io import fits',
      'inp = json.load(sys.stdin)',
      'with fits.open(inp["rmf"]) as r, fits.open(inp["arf"]) as a:',
      '    m = r["MATRIX"].data',
      '    area = a["SPECRESP"].data["SPECRESP"].astype(float)',
      '    g = 1.0 - inp["index"]',
      '    tot = 0.0',
      '    for i in range(len(m)):',
      '        lo = float(m["ENERG_LO"][i]); hi = float(m["ENERG_HI"][i])',
      '        flux = inp["norm"] * (hi ** g - lo ** g) / g',
      '        rowsum = float(sum(float(x) for x in m["MATRIX"][i]))',
      '        tot += inp["exposure"] * flux * float(area[i]) * rowsum',
      'print(json.dumps(tot))',
    ].join('\n');
    const ref = runPythonJson<number>('astropy', code, { rmf: RMF_FI0, arf: ARF_FI0, index: 1.7, norm: 0.01, exposure: EXPOSURE_S });
    expect(Math.abs(sum(counts) / ref - 1)).toBeLessThan(1e-9);
  });

  it('band rates partition the counts of the channels they cover', () => {
    const { response, grid } = demoResponse();
    const counts = foldCounts(response, binnedPhotonFlux(grid, MODEL), EXPOSURE_S);
    const eMax = response.channelHiKeV[response.detchans - 1];
    const bands = [
      { name: 'a', loKeV: 0, hiKeV: 2 },
      { name: 'b', loKeV: 2, hiKeV: eMax + 1 },
    ];
    const r = bandRates(response, counts, EXPOSURE_S, bands);
    expect(Math.abs(r[0].counts + r[1].counts - sum(counts)) / sum(counts)).toBeLessThan(1e-12);
    expect(r[0].rateCps).toBeCloseTo(r[0].counts / EXPOSURE_S, 12);
  });

  it('a narrow line puts its photons where the matrix row of its energy puts them (Σ = flux × T × ARF × row sum)', () => {
    const { response, grid } = demoResponse();
    const e = 6.1;
    const i = response.energLoKeV.findIndex((lo, k) => lo <= e && response.energHiKeV[k] > e);
    const model: SourceModel = { columnCm2: 0, abundances: DEFAULT_ABUNDANCES, components: [{ kind: 'gaussian-line', name: 'l', energyKeV: e, sigmaKeV: 0, photonFluxCm2s: 1e-3 }] };
    const counts = foldCounts(response, binnedPhotonFlux(grid, model), EXPOSURE_S);
    expect(Math.abs(sum(counts) / (1e-3 * EXPOSURE_S * response.areaCm2[i] * response.rowSum[i]) - 1)).toBeLessThan(1e-12);
  });
});

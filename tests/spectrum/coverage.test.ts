/**
 * Coverage of the ΔC = 1 profile intervals (Cash 1979: for one parameter of interest the interval
 * is a 68.3 % confidence interval asymptotically): 200 seeded spectra of the demo's absorbed power
 * law through a published release's response (1.1.0, Tarn-F, its 1024 channels summed in groups of
 * 8, as observers bin before fitting: interval coverage is a property of the likelihood and of the
 * ΔC rule, not of the channel resolution, and 8× fewer matrix elements make each fit cheaper),
 * each fitted with the same response.
 * Each parameter's interval must hold the truth in 60–76 % of trials (68.3 % ± 2.3 binomial
 * standard deviations for 200 trials; ΔC = 2.71 would give 90 %, ΔC = 0.5 52 %) and the mean bias
 * must stay below a fifth of the mean error.
 */
import { describe, expect, it } from 'vitest';
import { loadSourceFile } from '../../generators/content/index.ts';
import { binnedPhotonFlux, fitSpectrum, foldCounts, modelParameters, poissonDraws } from '../../generators/spectrum/index.ts';
import { demoResponse, regroupChannels, SOURCES } from './helpers.ts';

const TRIALS = 200;
/** A tenth of the source's reference exposure: about 10⁴ counts, where the C-statistic matters. */
const EXPOSURE_S = 2000;
/** Channels summed per group (1024 → 128). */
const CHANNEL_GROUP = 8;

describe('coverage of the fitted 1σ intervals', () => {
  it(`${TRIALS} seeded spectra: coverage 60–76 % and |mean bias| < σ/5 for every parameter`, { timeout: 1_800_000 }, async () => {
    const source = await loadSourceFile(`${SOURCES}/absorbed-power-law.yaml`);
    const demo = demoResponse();
    const grid = demo.grid;
    const response = regroupChannels(demo.response, CHANNEL_GROUP);
    const expected = foldCounts(response, binnedPhotonFlux(grid, source.model), EXPOSURE_S);
    const truth = new Map(modelParameters(source.model).map((p) => [p.name, p.value]));
    const stats = new Map(source.free.map((n) => [n, { inside: 0, bias: 0, error: 0 }]));
    let converged = 0;
    for (let t = 0; t < TRIALS; t++) {
      const counts = poissonDraws(expected, 10_000 + t);
      const fit = fitSpectrum({ response, grid, counts, exposureS: EXPOSURE_S }, { model: source.model, free: source.free, bounds: source.bounds });
      if (!fit.converged) continue;
      converged++;
      for (const p of fit.parameters.filter((x) => x.free)) {
        const trueValue = truth.get(p.name)!;
        const s = stats.get(p.name)!;
        if (trueValue >= p.value - p.errorLow! && trueValue <= p.value + p.errorHigh!) s.inside++;
        s.bias += p.value - trueValue;
        s.error += 0.5 * (p.errorLow! + p.errorHigh!);
      }
    }
    expect(converged).toBe(TRIALS);
    for (const [name, s] of stats) {
      const coverage = s.inside / converged;
      const biasOverError = s.bias / s.error;
      console.info(`coverage ${name}: ${(100 * coverage).toFixed(1)} %, mean bias ${biasOverError.toFixed(3)} σ`);
      expect(coverage, name).toBeGreaterThanOrEqual(0.6);
      expect(coverage, name).toBeLessThanOrEqual(0.76);
      expect(Math.abs(biasOverError), name).toBeLessThan(0.2);
    }
  });
});

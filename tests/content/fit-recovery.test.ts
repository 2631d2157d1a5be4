/**
 * Fitting the demo line fits recovers the stated truth (scripts/demo-truth.ts) within the errors
 * the fit derives from the quoted 1σ line errors, using the project's fitting module
 * (generators/fit, weighted least squares with covariance). A 3σ band per parameter: with the
 * scatter drawn at exactly the quoted errors, a parameter outside it means the generator, the
 * errors or the fit are inconsistent. χ² is checked against its distribution too.
 */
import { describe, expect, it } from 'vitest';
import { loadContent } from '../../generators/content/index.ts';
import { fitCentroidLaw, fitFwhmLaw } from '../../generators/fit/index.ts';
import { DEMO_TRUTH } from '../../scripts/demo-truth.ts';
import { DEMO_CONTENT } from './helpers.ts';
import { lostFraction, lossPerTransferAt } from '../../generators/physics/transfer-loss.ts';
import type { LineFit } from '../../generators/response/model-types.ts';

const tree = await loadContent(DEMO_CONTENT);
const K_SIGMA = 3;
/**
 * χ² with ν dof lies below ν + 4√(2ν) + 4 with probability > 0.999 for the ν here (≤ 10)
 * (a loose bound from the χ² tail; common practice, no source): catches errors 2× too small.
 */
const chi2Upper = (dof: number) => dof + 4 * Math.sqrt(2 * dof) + 4;

const cases = DEMO_TRUTH.flatMap((t) => Object.keys(t.detectors).map((det) => ({ release: t.release, det, truth: t.detectors[det] })));

describe('fits of the demo line fits recover the stated truth', () => {
  it.each(cases)('FWHM law, release $release detector $det', ({ release, det, truth }) => {
    const d = tree.releases.find((r) => r.release.id === release)!.detectors.find((x) => x.id === det)!;
    const fit = fitFwhmLaw(d.lineFits, {
      pairEnergyEv: truth.pairEnergyEv,
      pixelsPerEvent: truth.fwhm.pixelsPerEvent,
      initial: { readNoiseE: 3, fano: 0.115, sigma0Ev: truth.fwhm.sigma0Ev },
      free: ['readNoiseE', 'fano'],
    });
    for (const k of ['readNoiseE', 'fano'] as const) {
      expect(fit.errors[k], k).toBeGreaterThan(0);
      expect(Math.abs(fit.params[k] - truth.fwhm[k]), `${k}: fit ${fit.params[k]} ± ${fit.errors[k]}, truth ${truth.fwhm[k]}`).toBeLessThan(K_SIGMA * fit.errors[k]);
    }
    const dof = d.lineFits.length - 2;
    expect(fit.chi2).toBeLessThan(chi2Upper(dof));
  });

  it.each(cases)('centroid law, release $release detector $det', ({ release, det, truth }) => {
    const d = tree.releases.find((r) => r.release.id === release)!.detectors.find((x) => x.id === det)!;
    // With few, hard in-flight lines the soft charge loss is not constrained: hold it at the truth there.
    const soft = d.lineFits.some((l) => l.energyKeV < 1);
    const free = soft ? (['gainError', 'offsetEv', 'chargeLossEv'] as const) : (['gainError', 'offsetEv'] as const);
    // Whole-detector lines of a release with transfer loss sit lower by the charge lost at the
    // frame's mean transfer count (stated truth): undo it before fitting the centroid law.
    const tl = truth.transferLoss;
    const lines: LineFit[] = tl
      ? d.lineFits.map((l) => ({ ...l, centroidKeV: l.centroidKeV / (1 - lostFraction(lossPerTransferAt(tl, l.energyKeV), (d.regions!.transfers - 1) / 2)) }))
      : d.lineFits;
    const fit = fitCentroidLaw(lines, {
      initial: { gainError: 0, offsetEv: 0, chargeLossEv: soft ? 10 : truth.centroid.chargeLossEv, chargeLossScaleKeV: truth.centroid.chargeLossScaleKeV },
      free,
    });
    for (const k of free) {
      expect(Math.abs(fit.params[k] - truth.centroid[k]), `${k}: fit ${fit.params[k]} ± ${fit.errors[k]}, truth ${truth.centroid[k]}`).toBeLessThan(K_SIGMA * fit.errors[k]);
    }
    expect(fit.chi2).toBeLessThan(chi2Upper(d.lineFits.length - free.length));
  });
});

/** Invented detector parameters for tests (no real instrument). */
import type { ChannelGrid, LineFit, RedistributionSpec } from '../../generators/response/model-types.ts';
import type { ResponseMeta } from '../../generators/response/types.ts';

export const META: ResponseMeta = { telescop: 'KILNSAT', instrume: 'DEMOCAM', filter: 'NONE', chantype: 'PI', date: '2000-01-01' };

export function gaussianOnlySpec(over: Partial<RedistributionSpec> = {}): RedistributionSpec {
  return {
    pairEnergyEv: 3.65,
    thresholdKeV: 0.05,
    fwhm: { source: 'law', readNoiseE: 3.5, fano: 0.118, sigma0Ev: 0, pixelsPerEvent: { a: 1, bPerKeV: 0.4 } },
    centroid: { source: 'law', gainError: 0, offsetEv: 0, chargeLossEv: 0, chargeLossScaleKeV: 1 },
    tail: { source: 'law', fractionAtZero: 0, fractionScaleKeV: 1, tailScaleEv: 30 },
    shelf: { source: 'law', fraction: 0 },
    escape: false,
    siFluorescenceFraction: 0,
    ...over,
  };
}

export function fullSpec(over: Partial<RedistributionSpec> = {}): RedistributionSpec {
  return gaussianOnlySpec({
    thresholdKeV: 0.12,
    fwhm: { source: 'law', readNoiseE: 4, fano: 0.118, sigma0Ev: 4, pixelsPerEvent: { a: 1.5, bPerKeV: 0.3 } },
    centroid: { source: 'law', gainError: 0.003, offsetEv: 2, chargeLossEv: 25, chargeLossScaleKeV: 0.6 },
    tail: { source: 'law', fractionAtZero: 0.2, fractionScaleKeV: 1.2, tailScaleEv: 35 },
    shelf: { source: 'law', fraction: 0.015 },
    escape: true,
    siFluorescenceFraction: 0.003,
    ...over,
  });
}

export const CHANNELS: ChannelGrid = { count: 1024, firstChannel: 1, widthEv: 12, originEv: 0 };

/** Round illustrative silicon data (not a table): μ ∝ E^-2.7 with a ×10 jump at 1.839 keV. */
export const TOY_SILICON = {
  fluorescenceYield: 0.05,
  jumpRatio: 10,
  kEdgeKeV: 1.839,
  kAlphaKeV: 1.74,
  attenuation: (e: number) => (e > 1.839 ? 3200 : 320) * Math.pow(e / 1.839, -2.7),
};

export function lineFit(line: string, energyKeV: number, fields: Partial<LineFit> = {}): LineFit {
  return {
    line,
    energyKeV,
    centroidKeV: energyKeV,
    centroidErrEv: 0.5,
    fwhmEv: 120,
    fwhmErrEv: 1,
    tailFraction: 0,
    tailFractionErr: 0,
    tailScaleEv: 30,
    shelfFraction: 0,
    efficiency: null,
    efficiencyErr: null,
    ...fields,
  };
}

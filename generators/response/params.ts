/**
 * From a RedistributionSpec and the measured line fits, a function giving the profile parameters
 * at any true energy. Each parameter follows its law, or the line fits through monotone cubic
 * interpolation in ln E (Fritsch–Carlson), held constant outside the measured range:
 *  - centroid: the measured shift (centroid − E) is interpolated, so E itself still scales;
 *  - FWHM: the ratio measured/law (law from the spec's coefficients) is interpolated, so the line
 *    fits are reproduced at their energies and the law's energy dependence carries beyond them;
 *  - tail fraction, tail scale, shelf fraction: the values themselves;
 *  - tail 'collection': no empirical tail; the partial-charge events of the sensor's partially
 *    collecting layer (physics/partial-charge.ts) at every energy, from its attenuation.
 * The escape peak's centroid keeps the parent's charge loss (escapeAt): the escaping Kα leaves
 * E − E_Kα of charge at the parent's absorption depth, so it loses the parent's fraction of it.
 */
import { KilnInputError } from '../errors.ts';
import type { LineFit, RedistributionSpec } from './model-types.ts';
import type { ProfileParams } from '../physics/profile.ts';
import { checkFractions } from '../physics/profile.ts';
import { checkAboveFanoLimit, checkResolutionParams, sigmaEv, FWHM_PER_SIGMA, type ResolutionParams } from '../physics/resolution.ts';
import { logEnergyInterpolator } from '../physics/interp.ts';
import { escapeFractionFn, type EscapeInputs } from '../physics/escape.ts';
import { materialMassAttenuationCm2g } from '../physics/compound.ts';
import { partialChargeShape } from '../physics/partial-charge.ts';
import type { SensorSpec } from '../physics/types.ts';
import { exp } from '../numeric/index.ts';

const EV_PER_KEV = 1000;

export type ParamsAt = ((energyKeV: number) => ProfileParams) & {
  /** Centroid and σ of the escape peak of a parent of this energy (parent's charge-loss fraction). */
  escapeAt?: (energyKeV: number) => { centroidKeV: number; sigmaKeV: number };
};

export interface ParamsOptions {
  /** Silicon atomic data; required when spec.escape is true or spec.siFluorescenceFraction > 0. */
  silicon?: EscapeInputs;
  /** File the spec came from, for error messages. */
  file?: string;
  /** The sensor; required when spec.tail.source is 'collection'. */
  sensor?: SensorSpec;
  /** Si Kα share of the events at an energy; required when spec.siFluorescenceSource is 'stack'. */
  fluorescenceShare?: (energyKeV: number) => number;
}

function need(cond: boolean, field: string, value: unknown, expected: string, file?: string): void {
  if (!cond) throw new KilnInputError(`bad redistribution parameter ${field}`, { file, field, value, expected });
}

function checkLineFits(lines: readonly LineFit[], file?: string): LineFit[] {
  need(lines.length > 0, 'lineFits', 0, 'at least one line fit when a parameter comes from line-fits', file);
  const sorted = [...lines].sort((a, b) => a.energyKeV - b.energyKeV);
  for (let i = 0; i < sorted.length; i++) {
    const l = sorted[i];
    for (const k of ['energyKeV', 'centroidKeV', 'fwhmEv', 'tailFraction', 'tailScaleEv', 'shelfFraction'] as const)
      need(Number.isFinite(l[k]), `${l.line}.${k}`, l[k], 'a finite number', file);
    need(l.energyKeV > 0, `${l.line}.energyKeV`, l.energyKeV, '> 0 keV', file);
    if (i > 0) need(l.energyKeV > sorted[i - 1].energyKeV, `${l.line}.energyKeV`, l.energyKeV, `distinct from line ${sorted[i - 1].line}`, file);
  }
  return sorted;
}

/** Resolution parameters as stated in the spec (law or the coefficients that accompany line fits). */
export function resolutionParamsOf(spec: RedistributionSpec): ResolutionParams {
  const f = spec.fwhm;
  return { pairEnergyEv: spec.pairEnergyEv, fano: f.fano, readNoiseE: f.readNoiseE, sigma0Ev: f.sigma0Ev, pixelsPerEvent: f.pixelsPerEvent };
}

export function checkSpec(spec: RedistributionSpec, file?: string): void {
  checkResolutionParams(resolutionParamsOf(spec), 'fwhm');
  need(spec.thresholdKeV >= 0 && Number.isFinite(spec.thresholdKeV), 'thresholdKeV', spec.thresholdKeV, '≥ 0 keV', file);
  const c = spec.centroid;
  if (c.source === 'law') {
    for (const k of ['gainError', 'offsetEv', 'chargeLossEv'] as const) need(Number.isFinite(c[k]), `centroid.${k}`, c[k], 'a finite number', file);
    need(c.gainError > -1, 'centroid.gainError', c.gainError, '> −1', file);
    need(c.chargeLossEv === 0 || c.chargeLossScaleKeV > 0, 'centroid.chargeLossScaleKeV', c.chargeLossScaleKeV, '> 0 keV', file);
  }
  const t = spec.tail;
  if (t.source === 'law') {
    need(t.fractionAtZero >= 0 && t.fractionAtZero <= 1, 'tail.fractionAtZero', t.fractionAtZero, 'in [0, 1]', file);
    need(t.fractionScaleKeV > 0, 'tail.fractionScaleKeV', t.fractionScaleKeV, '> 0 keV', file);
    need(t.fractionAtZero === 0 || t.tailScaleEv > 0, 'tail.tailScaleEv', t.tailScaleEv, '> 0 eV', file);
  }
  if (spec.shelf.source === 'law') need(spec.shelf.fraction >= 0 && spec.shelf.fraction < 1, 'shelf.fraction', spec.shelf.fraction, 'in [0, 1)', file);
  need(spec.siFluorescenceFraction >= 0 && spec.siFluorescenceFraction < 1, 'siFluorescenceFraction', spec.siFluorescenceFraction, 'in [0, 1)', file);
}

/** Builds paramsAt(energyKeV) → ProfileParams; validates the spec and line fits first. */
export function buildParamsAt(spec: RedistributionSpec, lineFits: readonly LineFit[], opts: ParamsOptions = {}): ParamsAt {
  const { file } = opts;
  checkSpec(spec, file);
  const usesLines = [spec.fwhm, spec.centroid, spec.tail, spec.shelf].some((p) => p.source === 'line-fits');
  const lines = usesLines ? checkLineFits(lineFits, file) : [];
  const energies = lines.map((l) => l.energyKeV);
  const res = resolutionParamsOf(spec);

  let sigmaKeV: (e: number) => number;
  if (spec.fwhm.source === 'law') {
    sigmaKeV = (e) => sigmaEv(e, res) / EV_PER_KEV;
  } else {
    checkAboveFanoLimit(lines, spec.pairEnergyEv, spec.fwhm.fano, file);
    const ratio = logEnergyInterpolator(energies, lines.map((l) => l.fwhmEv / FWHM_PER_SIGMA / sigmaEv(l.energyKeV, res)), 'lineFits.energyKeV');
    sigmaKeV = (e) => (ratio(e) * sigmaEv(e, res)) / EV_PER_KEV;
  }

  let centroidKeV: (e: number) => number;
  const c = spec.centroid;
  if (c.source === 'law') {
    centroidKeV = (e) =>
      e * (1 + c.gainError) + (c.offsetEv - (c.chargeLossEv === 0 ? 0 : c.chargeLossEv * exp(-e / c.chargeLossScaleKeV))) / EV_PER_KEV;
  } else {
    const shiftEv = logEnergyInterpolator(energies, lines.map((l) => (l.centroidKeV - l.energyKeV) * EV_PER_KEV), 'lineFits.energyKeV');
    centroidKeV = (e) => e + shiftEv(e) / EV_PER_KEV;
  }

  let tailFraction: (e: number) => number;
  let tailScaleKeV: (e: number) => number;
  let partialAt: ((e: number) => ProfileParams['partial']) | null = null;
  const t = spec.tail;
  if (t.source === 'collection') {
    const sensor = opts.sensor;
    need(!!sensor?.partial, 'tail.source', 'collection', 'a sensor with a partially collecting layer (stack.sensor.partial)', file);
    const layer = sensor!.partial!;
    const { formula, densityGcm3 } = sensor!.material;
    partialAt = (e) => partialChargeShape(materialMassAttenuationCm2g(formula, e, 'total') * densityGcm3, layer, sensor!.depletionUm);
    tailFraction = () => 0;
    tailScaleKeV = () => 0;
  } else if (t.source === 'law') {
    tailFraction = (e) => t.fractionAtZero * exp(-e / t.fractionScaleKeV);
    tailScaleKeV = () => t.tailScaleEv / EV_PER_KEV;
  } else {
    const f = logEnergyInterpolator(energies, lines.map((l) => l.tailFraction), 'lineFits.energyKeV');
    const s = logEnergyInterpolator(energies, lines.map((l) => l.tailScaleEv), 'lineFits.energyKeV');
    tailFraction = f;
    tailScaleKeV = (e) => s(e) / EV_PER_KEV;
  }

  let shelfFraction: (e: number) => number;
  const sh = spec.shelf;
  if (sh.source === 'law') shelfFraction = () => sh.fraction;
  else shelfFraction = logEnergyInterpolator(energies, lines.map((l) => l.shelfFraction), 'lineFits.energyKeV');

  if ((spec.escape || spec.siFluorescenceFraction > 0) && !opts.silicon)
    throw new Error('buildParamsAt: silicon atomic data (opts.silicon) is required for the escape peak or Si fluorescence');
  const eta = spec.escape && opts.silicon ? escapeFractionFn(opts.silicon) : () => 0;
  const edge = opts.silicon?.kEdgeKeV ?? Infinity;
  const fluo = spec.siFluorescenceFraction;
  let fluorescence: (e: number) => number = (e) => (e > edge ? fluo : 0);
  if (spec.siFluorescenceSource === 'stack') {
    need(fluo === 0, 'siFluorescenceFraction', fluo, "0 when siFluorescenceSource is 'stack'", file);
    if (!opts.fluorescenceShare) throw new Error("buildParamsAt: opts.fluorescenceShare is required with siFluorescenceSource 'stack'");
    fluorescence = opts.fluorescenceShare;
  }

  const paramsAt: ParamsAt = (e: number): ProfileParams => {
    const p: ProfileParams = {
      centroidKeV: centroidKeV(e),
      sigmaKeV: sigmaKeV(e),
      tailFraction: tailFraction(e),
      tailScaleKeV: tailScaleKeV(e),
      shelfFraction: shelfFraction(e),
      escapeFraction: eta(e),
      fluorescenceFraction: fluorescence(e),
    };
    if (partialAt) {
      // The other components describe photons absorbed where charge is fully collected: they
      // share what the partial layer leaves (1 − its fraction), so fractions never exceed 1.
      const partial = partialAt(e)!;
      const rest = 1 - partial.fraction;
      p.partial = partial;
      p.shelfFraction *= rest;
      p.escapeFraction *= rest;
      p.fluorescenceFraction *= rest;
    }
    checkFractions(p, e);
    return p;
  };
  if (opts.silicon) {
    const kAlpha = opts.silicon.kAlphaKeV;
    // Energy scale at the escape energy without surface loss, plus the parent's loss as a share
    // of the charge: law → gain and offset at E − Kα, loss × (E − Kα)/E; line fits (gain, offset
    // and loss not separable) → the parent's relative shift applied to E − Kα.
    const lossFreeKeV =
      c.source === 'law'
        ? (e: number) => (e - kAlpha) * (1 + c.gainError) + c.offsetEv / EV_PER_KEV
        : (e: number) => (e - kAlpha) * (centroidKeV(e) / e);
    const lossKeV = c.source === 'law' ? (e: number) => (c.chargeLossEv === 0 ? 0 : (c.chargeLossEv * exp(-e / c.chargeLossScaleKeV)) / EV_PER_KEV) : () => 0;
    paramsAt.escapeAt = (e) => ({ centroidKeV: lossFreeKeV(e) - (lossKeV(e) * (e - kAlpha)) / e, sigmaKeV: sigmaKeV(e - kAlpha) });
  }
  return paramsAt;
}

/**
 * Extrapolation warning: every profile parameter is constrained by the line fits only between the
 * lowest and highest line energy. Beyond that coverage by more than a stated factor in energy the
 * matrix rests on the law's (or the interpolation's constant) extension alone: the check names the
 * parameter and the range. A candidate fails unless its release states a reason for that
 * detector and parameter; a draft warns; with a reason it warns and quotes it.
 */
import type { LineFit, RedistributionSpec } from '../response/model-types.ts';
import { fmt, makeCheck } from './make-check.ts';
import type { Check } from './types.ts';

/** Default margin: a factor 1.5 in energy beyond the outermost lines (Kiln's choice, no source). */
export const DEFAULT_EXTRAPOLATION_FACTOR = 1.5;

export type ProfileParameter = 'fwhm' | 'centroid' | 'tail' | 'shelf';
export const PROFILE_PARAMETERS: readonly ProfileParameter[] = ['fwhm', 'centroid', 'tail', 'shelf'];

export interface ExtrapolationOptions {
  product: string | null;
  factor: number;
  /** Release status is candidate (fails without a reason). */
  failing: boolean;
  /** Reason stated by the release for a parameter of this detector, if any. */
  reasonFor: (parameter: ProfileParameter) => string | undefined;
}

function how(spec: RedistributionSpec, p: ProfileParameter): string {
  const src = spec[p].source;
  if (src === 'line-fits') return p === 'fwhm' ? 'the law scaled by the nearest lines' : 'held at the outermost line fit';
  if (src === 'collection') return 'the partial-charge model';
  return 'the law';
}

export function extrapolationChecks(spec: RedistributionSpec, lineFits: readonly LineFit[], gridKeV: [number, number], o: ExtrapolationOptions): Check[] {
  const energies = lineFits.map((l) => l.energyKeV).sort((a, b) => a - b);
  return PROFILE_PARAMETERS.map((p) => {
    const id = `model.extrapolation.${p}`;
    const title = `${p} within the line fits' coverage (factor ${fmt(o.factor)} in energy)`;
    const reason = o.reasonFor(p);
    if (energies.length === 0) {
      return makeCheck(reason ? 'warn' : o.failing ? 'fail' : 'warn', {
        id, title, product: o.product, measured: null, tolerance: o.factor, unit: 'factor',
        message: `no line fits: ${p} over ${fmt(gridKeV[0])}–${fmt(gridKeV[1])} keV comes from ${how(spec, p)} alone${reason ? `; reason stated: ${reason}` : ''}`,
      });
    }
    const lo = energies[0];
    const hi = energies[energies.length - 1];
    const below = lo / gridKeV[0];
    const above = gridKeV[1] / hi;
    const worst = Math.max(below, above);
    const parts: string[] = [];
    if (below > o.factor) parts.push(`below ${fmt(lo)} keV down to ${fmt(gridKeV[0])} keV (factor ${below.toFixed(2)})`);
    if (above > o.factor) parts.push(`above ${fmt(hi)} keV up to ${fmt(gridKeV[1])} keV (factor ${above.toFixed(2)})`);
    const ok = parts.length === 0;
    const status = ok ? 'pass' : reason ? 'warn' : o.failing ? 'fail' : 'warn';
    const msg = ok
      ? `lines cover ${fmt(lo)}–${fmt(hi)} keV; the grid ${fmt(gridKeV[0])}–${fmt(gridKeV[1])} keV stays within a factor ${fmt(o.factor)}`
      : `${p} is extrapolated ${parts.join(' and ')} by ${how(spec, p)}${reason ? `; reason stated: ${reason}` : '; state a reason in release.yaml checks.extrapolation or add lines'}`;
    return makeCheck(status, { id, title, product: o.product, measured: Number(worst.toFixed(4)), tolerance: o.factor, unit: 'factor', message: msg });
  });
}

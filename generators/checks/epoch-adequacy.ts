/**
 * Epoch adequacy: an epoch's ARF is made at its reference date, so the contamination's
 * transmission may change by at most a stated fraction across the epoch: max over the epoch of
 * |T(d)/T(ref) − 1| ≤ tolerance, at the softest energies of the grid where it matters most — every
 * grid energy is tried and the worst is named (for a carbon deposit that is just above the C K
 * edge, not the grid's very first bin below it). Thickness laws are monotonic, so the extremes are
 * at the epoch's ends; an open-ended epoch is judged up to the far future (its law's limit), and
 * the message names the dates beyond which the tolerance is exceeded.
 */
import { contaminationTransmission, isoDateToDays } from '../physics/contamination.ts';
import type { ContaminationSpec } from '../physics/types.ts';
import { fmt, makeCheck } from './make-check.ts';
import type { Check } from './types.ts';

/** Default tolerance (the and Kiln's choice, no source): 3 % in transmission. */
export const DEFAULT_EPOCH_TRANSMISSION_CHANGE = 0.03;
/** How far an open-ended epoch is followed, days (a century: beyond any mission). */
const OPEN_END_DAYS = 36525;
const MS_PER_DAY = 86_400_000;

export interface EpochSpan {
  id: string;
  date: string;
  validFrom: string;
  validTo: string | null;
}

function dayToIso(day: number): string {
  return new Date(Math.round(day) * MS_PER_DAY).toISOString().slice(0, 10);
}

export function epochAdequacyChecks(
  contamination: ContaminationSpec | null,
  epochs: readonly EpochSpan[],
  energiesKeV: Float64Array,
  tolerance: number,
  opts: { product: string | null; failing: boolean; source: string },
): Check[] {
  if (!contamination) return [];
  const tAll = (day: number) => contaminationTransmission(contamination, energiesKeV, dayToIso(day));
  return epochs.map((ep) => {
    const from = isoDateToDays(ep.validFrom);
    // validTo is exclusive: the last day valid is the day before
    const to = ep.validTo === null ? from + OPEN_END_DAYS : isoDateToDays(ep.validTo) - 1;
    const refAll = tAll(isoDateToDays(ep.date));
    const worstAt = (day: number) => {
      const t = tAll(day);
      let k = 0;
      for (let j = 1; j < t.length; j++) if (Math.abs(t[j] / refAll[j] - 1) > Math.abs(t[k] / refAll[k] - 1)) k = j;
      return k;
    };
    const kFrom = worstAt(from);
    const kTo = worstAt(to);
    const ends = [Math.abs(tAll(from)[kFrom] / refAll[kFrom] - 1), Math.abs(tAll(to)[kTo] / refAll[kTo] - 1)];
    const k = ends[0] >= ends[1] ? kFrom : kTo;
    const e = Float64Array.of(energiesKeV[k]);
    const ref = refAll[k];
    const change = (day: number) => Math.abs(contaminationTransmission(contamination, e, dayToIso(day))[0] / ref - 1);
    const worst = Math.max(ends[0], ends[1]);
    const ok = worst <= tolerance;
    let where = '';
    if (!ok) {
      const parts: string[] = [];
      if (change(from) > tolerance) parts.push(`before ${dayToIso(firstWithin(change, from, isoDateToDays(ep.date), tolerance))}`);
      if (change(to) > tolerance) parts.push(`from ${dayToIso(firstBeyond(change, isoDateToDays(ep.date), to, tolerance))}`);
      where = ` — exceeded ${parts.join(' and ')}`;
    }
    const span = `${ep.validFrom} to ${ep.validTo ?? 'open end'}`;
    return makeCheck(ok ? 'pass' : opts.failing ? 'fail' : 'warn', {
      id: `model.epoch.transmission.${ep.id}`,
      title: `contamination transmission across epoch ${ep.id}`,
      product: opts.product,
      measured: worst,
      tolerance,
      unit: 'fraction',
      message: `transmission at ${fmt(energiesKeV[k])} keV changes by up to ${(worst * 100).toFixed(1)} % from its value at ${ep.date} over ${span} (allowed ${(tolerance * 100).toFixed(1)} %, ${opts.source})${where}`,
    });
  });
}

/** First day in [ref, end] where change exceeds tol (change grows away from ref). */
function firstBeyond(change: (d: number) => number, ref: number, end: number, tol: number): number {
  let lo = ref;
  let hi = end;
  while (hi - lo > 1) {
    const mid = Math.floor((lo + hi) / 2);
    if (change(mid) > tol) hi = mid;
    else lo = mid;
  }
  return hi;
}

/** First day in [start, ref] where change is within tol. */
function firstWithin(change: (d: number) => number, start: number, ref: number, tol: number): number {
  let lo = start;
  let hi = ref;
  while (hi - lo > 1) {
    const mid = Math.floor((lo + hi) / 2);
    if (change(mid) > tol) lo = mid;
    else hi = mid;
  }
  return hi;
}

/** Thickness of a contamination layer versus observation date, by the laws of types.ts. */
import { KilnInputError } from '../errors.ts';
import type { ContaminationLaw, ContaminationSpec } from './types.ts';
import { materialTransmission } from './layers.ts';
import { expm1 } from '../numeric/index.ts';

/** Mean Julian year, days (IAU). */
export const DAYS_PER_YEAR = 365.25;
const MS_PER_DAY = 86_400_000;

/** Days since 1970-01-01 (UTC) of a calendar date YYYY-MM-DD; anything else → KilnInputError naming `field`. */
export function isoDateToDays(dateIso: string, field = 'date'): number {
  const m = typeof dateIso === 'string' ? /^(\d{4})-(\d{2})-(\d{2})$/.exec(dateIso) : null;
  const bad = () =>
    new KilnInputError(`not a calendar date: ${JSON.stringify(dateIso)}`, { field, value: dateIso, expected: 'a date YYYY-MM-DD' });
  if (!m) throw bad();
  const [y, mo, d] = [Number(m[1]), Number(m[2]), Number(m[3])];
  const ms = Date.UTC(y, mo - 1, d);
  const back = new Date(ms);
  // Date.UTC rolls 2023-02-30 over to March: reject dates that do not round-trip.
  if (back.getUTCFullYear() !== y || back.getUTCMonth() !== mo - 1 || back.getUTCDate() !== d) throw bad();
  return ms / MS_PER_DAY;
}

function finite(v: number, field: string, expected: string, ok: (v: number) => boolean): void {
  if (typeof v !== 'number' || !Number.isFinite(v) || !ok(v)) {
    throw new KilnInputError(`contamination law: bad ${field}`, { field: `contamination.law.${field}`, value: v, expected });
  }
}

/** Thickness in µm on `dateIso` (floored at 0 for the linear law). */
export function contaminationThicknessUm(spec: ContaminationSpec | ContaminationLaw, dateIso: string): number {
  const law = 'law' in spec ? spec.law : spec;
  const day = isoDateToDays(dateIso, 'date');
  if (law.kind === 'linear') {
    const ref = isoDateToDays(law.referenceDate, 'contamination.law.referenceDate');
    finite(law.thicknessAtReferenceUm, 'thicknessAtReferenceUm', 'a finite thickness >= 0 µm', (v) => v >= 0);
    finite(law.rateUmPerYear, 'rateUmPerYear', 'a finite rate in µm/year', () => true);
    return Math.max(0, law.thicknessAtReferenceUm + (law.rateUmPerYear * (day - ref)) / DAYS_PER_YEAR);
  }
  if (law.kind === 'exponential') {
    const start = isoDateToDays(law.startDate, 'contamination.law.startDate');
    finite(law.initialUm, 'initialUm', 'a finite thickness >= 0 µm', (v) => v >= 0);
    finite(law.asymptoticUm, 'asymptoticUm', 'a finite thickness >= 0 µm', (v) => v >= 0);
    finite(law.timescaleDays, 'timescaleDays', 'a finite time > 0 days', (v) => v > 0);
    if (day < start) return law.initialUm;
    return law.initialUm + (law.asymptoticUm - law.initialUm) * -expm1(-(day - start) / law.timescaleDays);
  }
  throw new KilnInputError('contamination law: unknown kind', {
    field: 'contamination.law.kind',
    value: (law as { kind?: unknown }).kind,
    expected: '"linear" or "exponential"',
  });
}

/** Transmission of the contamination layer on `dateIso`. */
export function contaminationTransmission(spec: ContaminationSpec, energiesKeV: Float64Array, dateIso: string): Float64Array {
  return materialTransmission(spec.material, contaminationThicknessUm(spec, dateIso), energiesKeV, `contamination "${spec.name}"`);
}

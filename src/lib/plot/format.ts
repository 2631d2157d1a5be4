/** Number formatting for ticks and readouts. */
import { format } from 'd3-format';

const sig4 = format('.4~g');
const sig3 = format('.3~g');

/** Four significant digits, no trailing zeros (readouts). */
export const fmt4 = (v: number | null | undefined): string => (v === null || v === undefined || !Number.isFinite(v) ? '—' : sig4(v));
export const fmt3 = (v: number | null | undefined): string => (v === null || v === undefined || !Number.isFinite(v) ? '—' : sig3(v));

/** Rounds for embedding in JSON: `digits` significant digits keeps page weight down. */
export const roundSig = (v: number | null, digits = 4): number | null =>
  v === null || !Number.isFinite(v) ? null : Number(v.toPrecision(digits));

/** Axis title "Label (unit)". */
export const axisTitle = (label: string, unit: string): string => (unit ? `${label} (${unit})` : label);

/** SVG/HTML text and attribute escaping: the site's one rule (src/lib/escape.ts). */
export { esc } from '../escape.ts';

/** Significant digits of an uncertainty as shown: two (common practice, no source). */
const UNC_DIGITS = 2;

/**
 * Value and 1σ uncertainty for tables: the uncertainty to two significant digits and the value to
 * the same decimal place (common practice, no source); without an uncertainty, four significant digits.
 */
export function fmtMeasured(value: number, uncertainty: number | null): { value: string; uncertainty: string } {
  if (uncertainty === null || !Number.isFinite(uncertainty) || uncertainty <= 0 || !Number.isFinite(value)) return { value: fmt4(value), uncertainty: uncertainty === 0 ? '0' : fmt3(uncertainty) };
  const decimals = Math.max(0, UNC_DIGITS - 1 - Math.floor(Math.log10(uncertainty)));
  const big = Math.abs(value) >= 1e6 || Math.abs(uncertainty) < 1e-6;
  if (big) return { value: fmt4(value), uncertainty: fmt3(uncertainty) };
  const v = value.toFixed(decimals).replace(/^-/, '−');
  return { value: v === '−0' || /^−0\.0*$/.test(v) ? v.slice(1) : v, uncertainty: uncertainty.toFixed(decimals) };
}

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

/** SVG/HTML text escaping. */
export function esc(s: string): string {
  return s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');
}

/**
 * Text forms of a response case's choices, shared by `kiln response` and the site's response
 * page: "lo:hi:n" energies, an edge list, whole numbers. Bad text names the field. Pure.
 */
import { KilnInputError } from '../errors.ts';
import type { EnergyChoice } from './case.ts';

const NUMBER_RE = /^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/;

/** "0.3:10:500" → 500 linear bins from 0.3 to 10 keV. */
export function parseEnergyRange(text: string, field = 'energies'): EnergyChoice {
  const parts = text.split(':');
  const nums = parts.map((p) => (NUMBER_RE.test(p.trim()) ? Number(p.trim()) : NaN));
  if (parts.length !== 3 || nums.some((x) => !Number.isFinite(x)))
    throw new KilnInputError('energy grid is not lo:hi:n', { field, value: text, expected: 'lo:hi:n, e.g. 0.3:10:500 (keV, keV, bins)' });
  return { kind: 'range', loKeV: nums[0], hiKeV: nums[1], bins: nums[2] };
}

/** Bin edges in keV, separated by newlines, commas or spaces; "#" starts a comment. */
export function parseEnergyEdges(text: string, field = 'energy-grid'): EnergyChoice {
  const items = text
    .split(/\r?\n/)
    .map((l) => l.replace(/#.*/, ''))
    .join(' ')
    .split(/[\s,]+/)
    .filter((s) => s.length > 0);
  const edges = items.map((s, i) => {
    if (!NUMBER_RE.test(s)) throw new KilnInputError('energy grid edge is not a number', { field, value: `edge ${i + 1}: ${s}`, expected: 'bin edges in keV, one per line (or separated by commas or spaces)' });
    return Number(s);
  });
  return { kind: 'edges', edgesKeV: edges };
}

/** A whole number ≥ min. */
export function parseWhole(text: string, field: string, min: number, what: string): number {
  if (!/^\d+$/.test(text.trim()) || Number(text) < min) throw new KilnInputError(`${field} is not ${what}`, { field, value: text, expected: `a whole number ≥ ${min}` });
  return Number(text);
}

/**
 * Cold-gas absorption of a source: photoabsorption cross section per hydrogen atom,
 * σ(E) = Σ_Z (n_Z/n_H) · (μ/ρ)_photo,Z(E) · A_Z / N_A, from the committed element table
 * (physics/data, xraylib's CS_Photo) and an abundance table; transmission exp(−N_H σ).
 */
import { massAttenuationCm2g } from '../physics/attenuation.ts';
import { elementBySymbol, tableEdgesKeV } from '../physics/elements.ts';
import { DEFAULT_ABUNDANCES, type AbundanceTable } from './data/abundances.ts';
import { exp, pow } from '../numeric/index.ts';

/** Avogadro constant, 1/mol (SI 2019, exact). */
export const AVOGADRO_PER_MOL = 6.02214076e23;

interface Absorber {
  symbol: string;
  perH: number;
  gPerAtom: number;
}

const ABSORBERS = new Map<string, Absorber[]>();

function absorbers(t: AbundanceTable): Absorber[] {
  let a = ABSORBERS.get(t.name);
  if (a) return a;
  a = Object.entries(t.logEpsilon).map(([symbol, le]) => ({
    symbol,
    perH: pow(10, le - 12),
    gPerAtom: elementBySymbol(symbol).atomicWeight / AVOGADRO_PER_MOL,
  }));
  ABSORBERS.set(t.name, a);
  return a;
}

/** Photoabsorption cross section per H atom, cm², at one energy (0.1–20 keV). */
export function crossSectionPerHCm2(energyKeV: number, table: AbundanceTable = DEFAULT_ABUNDANCES): number {
  let s = 0;
  for (const a of absorbers(table)) s += a.perH * a.gPerAtom * massAttenuationCm2g(a.symbol, energyKeV, 'photo');
  return s;
}

/** Transmission exp(−N_H σ(E)) of a column of N_H hydrogen atoms per cm². */
export function transmission(energyKeV: number, columnCm2: number, table: AbundanceTable = DEFAULT_ABUNDANCES): number {
  return exp(-columnCm2 * crossSectionPerHCm2(energyKeV, table));
}

/** Energies where the absorbing gas's cross section jumps (edges of its elements), keV, ascending. */
export function absorptionEdgesKeV(table: AbundanceTable = DEFAULT_ABUNDANCES): number[] {
  const set = new Set<number>();
  for (const a of absorbers(table)) for (const e of tableEdgesKeV(a.symbol)) set.add(e);
  return [...set].sort((x, y) => x - y);
}

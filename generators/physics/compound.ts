/**
 * Chemical formulas → compositions → mass attenuation of a material. Grammar:
 *   formula := part+ ; part := (Symbol | "(" formula ")") count? ; Symbol := [A-Z][a-z]? ;
 *   count := decimal number > 0 (e.g. C22H10N2O5, Si3N4, SiO1.9, Ca(OH)2).
 * The mixture rule: μ/ρ = Σ w_i (μ/ρ)_i with w_i the mass fractions from atomic weights.
 */
import { KilnInputError } from '../errors.ts';
import { massAttenuationArrayCm2g, massAttenuationCm2g, type CrossSectionKind } from './attenuation.ts';
import { ELEMENT_SYMBOLS, elementBySymbol, isKnownElement } from './elements.ts';

export interface CompositionPart {
  symbol: string;
  /** Atoms per formula unit. */
  count: number;
  massFraction: number;
}

export interface Composition {
  formula: string;
  /** In order of first appearance in the formula, each element once. */
  parts: CompositionPart[];
  /** Mass of one formula unit, g/mol. */
  molarMassGmol: number;
}

const EXPECTED = `element symbols ${ELEMENT_SYMBOLS[0]}..${ELEMENT_SYMBOLS[ELEMENT_SYMBOLS.length - 1]} with optional counts and parentheses, e.g. C22H10N2O5`;

function fail(formula: string, pos: number, what: string): never {
  // Positions are 1-based for people.
  throw new KilnInputError(`bad chemical formula "${formula}": ${what} at position ${pos + 1}`, {
    field: 'formula',
    value: formula,
    expected: EXPECTED,
  });
}

/** Atom counts per element, in order of first appearance. Bad formula → KilnInputError with the position. */
export function parseFormula(formula: string): { symbol: string; count: number }[] {
  if (typeof formula !== 'string' || formula.length === 0) {
    throw new KilnInputError('empty chemical formula', { field: 'formula', value: formula, expected: EXPECTED });
  }
  let pos = 0;
  const readCount = (): number => {
    const m = /^\d+(\.\d+)?|^\.\d+/.exec(formula.slice(pos));
    if (!m) return 1;
    const n = Number(m[0]);
    if (!(n > 0)) fail(formula, pos, `count ${m[0]} must be > 0`);
    pos += m[0].length;
    return n;
  };
  const readGroup = (depth: number): Map<string, number> => {
    const acc = new Map<string, number>();
    const add = (sym: string, n: number) => acc.set(sym, (acc.get(sym) ?? 0) + n);
    const start = pos;
    while (pos < formula.length) {
      const c = formula[pos];
      if (c === '(') {
        const open = pos;
        pos++;
        const inner = readGroup(depth + 1);
        if (formula[pos] !== ')') fail(formula, open, 'unclosed "("');
        pos++;
        const n = readCount();
        for (const [s, k] of inner) add(s, k * n);
      } else if (c === ')') {
        if (depth === 0) fail(formula, pos, 'unmatched ")"');
        if (pos === start) fail(formula, pos, 'empty parentheses');
        return acc;
      } else if (c >= 'A' && c <= 'Z') {
        const at = pos;
        let sym = c;
        pos++;
        if (pos < formula.length && formula[pos] >= 'a' && formula[pos] <= 'z') sym += formula[pos++];
        if (!isKnownElement(sym)) {
          throw new KilnInputError(`bad chemical formula "${formula}": element "${sym}" at position ${at + 1} is not in the table`, {
            field: 'formula',
            value: formula,
            expected: EXPECTED,
          });
        }
        add(sym, readCount());
      } else {
        fail(formula, pos, `unexpected character "${c}"`);
      }
    }
    return acc;
  };
  const all = readGroup(0);
  if (pos !== formula.length) fail(formula, pos, 'unexpected text');
  if (all.size === 0) fail(formula, 0, 'no element');
  return [...all].map(([symbol, count]) => ({ symbol, count }));
}

const CACHE = new Map<string, Composition>();

/** Mass fractions of a formula (memoised; compositions are immutable). */
export function composition(formula: string): Composition {
  const hit = CACHE.get(formula);
  if (hit) return hit;
  const atoms = parseFormula(formula);
  const masses = atoms.map((a) => a.count * elementBySymbol(a.symbol).atomicWeight);
  const molarMassGmol = masses.reduce((s, m) => s + m, 0);
  const c: Composition = {
    formula,
    parts: atoms.map((a, i) => ({ symbol: a.symbol, count: a.count, massFraction: masses[i] / molarMassGmol })),
    molarMassGmol,
  };
  CACHE.set(formula, c);
  return c;
}

/** μ/ρ of a material, cm²/g, by the mixture rule. */
export function materialMassAttenuationCm2g(formula: string | Composition, energyKeV: number, kind: CrossSectionKind = 'total'): number {
  const c = typeof formula === 'string' ? composition(formula) : formula;
  let sum = 0;
  for (const p of c.parts) sum += p.massFraction * massAttenuationCm2g(p.symbol, energyKeV, kind);
  return sum;
}

/** Vectorised μ/ρ of a material, cm²/g. */
export function materialMassAttenuationArrayCm2g(
  formula: string | Composition,
  energiesKeV: Float64Array,
  kind: CrossSectionKind = 'total',
): Float64Array {
  const c = typeof formula === 'string' ? composition(formula) : formula;
  const out = new Float64Array(energiesKeV.length);
  const tmp = new Float64Array(energiesKeV.length);
  for (const p of c.parts) {
    massAttenuationArrayCm2g(p.symbol, energiesKeV, kind, tmp);
    for (let j = 0; j < out.length; j++) out[j] += p.massFraction * tmp[j];
  }
  return out;
}

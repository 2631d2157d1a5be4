import { describe, expect, it } from 'vitest';
import { KilnInputError } from '../../generators/errors.ts';
import { composition, materialMassAttenuationArrayCm2g, materialMassAttenuationCm2g, parseFormula } from '../../generators/physics/index.ts';
import { runXraylibChecks } from '../support/python.ts';
import { relErr, xraylibMap } from './xraylib-ref.ts';

const FORMULAS = ['SiO2', 'C22H10N2O5', 'Si3N4', 'Al2O3', 'Ca(OH)2', 'CH2'];
const ENERGIES = [0.15, 0.27, 0.3, 0.45, 0.6, 0.9, 1.2, 1.5, 1.7, 2.1, 3.3, 5.9, 8.05, 12, 19];

describe('formula parsing (plain chemistry, common practice)', () => {
  it('counts atoms, merges repeats, expands parentheses', () => {
    expect(parseFormula('C22H10N2O5')).toEqual([
      { symbol: 'C', count: 22 }, { symbol: 'H', count: 10 }, { symbol: 'N', count: 2 }, { symbol: 'O', count: 5 },
    ]);
    expect(parseFormula('Ca(OH)2')).toEqual([{ symbol: 'Ca', count: 1 }, { symbol: 'O', count: 2 }, { symbol: 'H', count: 2 }]);
    expect(parseFormula('CH3CH3')).toEqual([{ symbol: 'C', count: 2 }, { symbol: 'H', count: 6 }]);
    expect(parseFormula('SiO1.9')).toEqual([{ symbol: 'Si', count: 1 }, { symbol: 'O', count: 1.9 }]);
  });

  it('mass fractions sum to one', () => {
    for (const f of FORMULAS) expect(composition(f).parts.reduce((s, p) => s + p.massFraction, 0)).toBeCloseTo(1, 12);
  });
});

describe.runIf(runXraylibChecks)('compounds against xraylib (Debian python3-xraylib)', () => {
  it('mass fractions match xraylib CompoundParser', () => {
    const ref = xraylibMap<string, Record<string, number>>(
      "dict((xrl.AtomicNumberToSymbol(z), w) for z, w in zip(xrl.CompoundParser(x)['Elements'], xrl.CompoundParser(x)['massFractions']))",
      FORMULAS,
    );
    FORMULAS.forEach((f, i) => {
      for (const p of composition(f).parts) expect(relErr(p.massFraction, ref[i][p.symbol]), `${f} ${p.symbol}`).toBeLessThan(1e-4);
    });
  });

  it('μ/ρ of SiO2, polyimide and others match CS_Total_CP / CS_Photo_CP within the 0.5 % interpolation tolerance', () => {
    const cases = FORMULAS.flatMap((f) => ENERGIES.map((e) => [f, e] as [string, number]));
    const ref = xraylibMap<[string, number], [number, number]>('[xrl.CS_Total_CP(x[0], x[1]), xrl.CS_Photo_CP(x[0], x[1])]', cases);
    cases.forEach(([f, e], i) => {
      expect(relErr(materialMassAttenuationCm2g(f, e, 'total'), ref[i][0]), `${f} ${e} keV total`).toBeLessThan(0.005);
      expect(relErr(materialMassAttenuationCm2g(f, e, 'photo'), ref[i][1]), `${f} ${e} keV photo`).toBeLessThan(0.005);
    });
    const vec = materialMassAttenuationArrayCm2g('SiO2', Float64Array.from(ENERGIES));
    ENERGIES.forEach((e, i) => expect(vec[i]).toBeCloseTo(materialMassAttenuationCm2g('SiO2', e), 10));
  });
});

describe('bad formulas', () => {
  const BAD: [string, RegExp][] = [
    ['', /empty/],
    ['Si(O2', /unclosed "\(" at position 3/],
    ['SiO2)', /unmatched "\)" at position 5/],
    ['si', /unexpected character "s" at position 1/],
    ['C22H1x0', /unexpected character "x" at position 6/],
    ['SiXe2', /element "Xe" at position 3 is not in the table/],
    ['Qq', /element "Qq" at position 1/],
    ['H0', /count 0 must be > 0 at position 2/],
    ['()', /empty parentheses at position 2/],
    ['Si O2', /unexpected character " " at position 3/],
  ];
  it.each(BAD)('%j → KilnInputError naming the formula and the position', (f, msg) => {
    let err: unknown;
    try {
      composition(f);
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(KilnInputError);
    expect((err as KilnInputError).message).toMatch(msg);
    expect((err as KilnInputError).where.field).toBe('formula');
    expect((err as KilnInputError).where.value).toBe(f);
  });
});

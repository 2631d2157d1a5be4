import { describe, expect, it } from 'vitest';
import { KilnInputError } from '../../generators/errors.ts';
import { contaminationThicknessUm, contaminationTransmission, isoDateToDays, type ContaminationSpec } from '../../generators/physics/index.ts';
import { runXraylibChecks } from '../support/python.ts';
import { xraylibMap } from './xraylib-ref.ts';

// Invented demo law parameters.
const LINEAR: ContaminationSpec = {
  name: 'hydrocarbon film',
  material: { formula: 'C8H8', densityGcm3: 1.0 },
  law: { kind: 'linear', referenceDate: '2024-03-01', thicknessAtReferenceUm: 0.05, rateUmPerYear: 0.02 },
};
const EXPONENTIAL: ContaminationSpec = {
  ...LINEAR,
  law: { kind: 'exponential', startDate: '2024-03-01', initialUm: 0.01, asymptoticUm: 0.3, timescaleDays: 400 },
};
const DATES = ['2020-01-01', '2024-02-29', '2024-03-01', '2025-07-14', '2031-12-31'];

describe.runIf(runXraylibChecks)('contamination laws (types.ts) with day counts from python datetime', () => {
  it('linear and exponential thickness on several dates', () => {
    // Python's datetime is the independent calendar; the laws are the formulas stated in types.ts.
    const days = xraylibMap<string, number>("(__import__('datetime').date.fromisoformat(x) - __import__('datetime').date(2024, 3, 1)).days", DATES);
    DATES.forEach((d, i) => {
      const lin = Math.max(0, 0.05 + (0.02 * days[i]) / 365.25);
      expect(contaminationThicknessUm(LINEAR, d)).toBeCloseTo(lin, 12);
      const exp = days[i] < 0 ? 0.01 : 0.01 + 0.29 * (1 - Math.exp(-days[i] / 400));
      expect(contaminationThicknessUm(EXPONENTIAL, d)).toBeCloseTo(exp, 12);
    });
  });

  it('transmission matches exp(−μρt) with xraylib CS_Total_CP', () => {
    const t = contaminationThicknessUm(EXPONENTIAL, '2027-01-01');
    const E = [0.25, 0.3, 0.5, 1];
    const ref = xraylibMap<number>(`math.exp(-xrl.CS_Total_CP('C8H8', x) * 1.0 * ${t} * 1e-4)`, E);
    const tr = contaminationTransmission(EXPONENTIAL, Float64Array.from(E), '2027-01-01');
    // |ln ratio| ≤ δ·τ: an error δ in μ/ρ scales with the optical depth τ of the film (δ = 1.5e-3, as
    // tests/physics/efficiency.test.ts), so a thin early film is held as tightly as a thick late one.
    E.forEach((e, i) => expect(Math.abs(Math.log(tr[i] / ref[i])), `${e} keV`).toBeLessThanOrEqual(1.5e-3 * -Math.log(ref[i]) + 1e-12));
  });
});

describe('contamination laws: shape (from the definitions in types.ts)', () => {
  it('linear law is floored at zero long before the reference date', () => {
    expect(contaminationThicknessUm(LINEAR, '1990-01-01')).toBe(0);
  });
  it('exponential law stays at the initial value before its start and tends to the asymptote', () => {
    expect(contaminationThicknessUm(EXPONENTIAL, '2000-01-01')).toBe(0.01);
    expect(contaminationThicknessUm(EXPONENTIAL, '2100-01-01')).toBeCloseTo(0.3, 9);
  });
});

describe('bad dates and laws', () => {
  it.each(['2023-02-30', '2023-13-01', '23-01-01', '2023/01/01', '', '2023-1-1'])('date %j → KilnInputError', (d) => {
    expect(() => contaminationThicknessUm(LINEAR, d)).toThrow(KilnInputError);
    expect(() => isoDateToDays(d)).toThrow(/calendar date/);
  });
  it('bad reference date names the field', () => {
    const bad = { ...LINEAR, law: { ...LINEAR.law, referenceDate: '2024-02-31' } } as ContaminationSpec;
    try {
      contaminationThicknessUm(bad, '2025-01-01');
      expect.unreachable();
    } catch (e) {
      expect((e as KilnInputError).where.field).toBe('contamination.law.referenceDate');
    }
  });
  it('non-positive time scale and negative thickness are rejected', () => {
    const a = { ...EXPONENTIAL, law: { ...EXPONENTIAL.law, timescaleDays: 0 } } as ContaminationSpec;
    expect(() => contaminationThicknessUm(a, '2025-01-01')).toThrow(/timescaleDays/);
    const b = { ...EXPONENTIAL, law: { ...EXPONENTIAL.law, asymptoticUm: -1 } } as ContaminationSpec;
    expect(() => contaminationThicknessUm(b, '2025-01-01')).toThrow(KilnInputError);
    const c = { ...LINEAR, law: { kind: 'cubic' } } as unknown as ContaminationSpec;
    expect(() => contaminationThicknessUm(c, '2025-01-01')).toThrow(/unknown kind/);
  });
});

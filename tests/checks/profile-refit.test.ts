/**
 * Refit of matrix rows with the line-fit profile family: recovers the tail fraction, tail scale
 * and shelf a matrix was built with (they are the builder's inputs, so this tests the refit; the
 * closure tests in tests/pipeline/closure-profile.test.ts use a truth from another model).
 */
import { describe, expect, it } from 'vitest';
import { refitProfileAt } from '../../generators/checks/profile-refit.ts';
import { buildRedistribution } from '../../generators/response/index.ts';
import { CHANNELS, META, gaussianOnlySpec } from '../response/spec-fixtures.ts';

describe('profile refit of matrix rows', () => {
  const tail = { source: 'law' as const, fractionAtZero: 0.3, fractionScaleKeV: 0.8, tailScaleEv: 60 };
  const spec = gaussianOnlySpec({ tail, shelf: { source: 'law', fraction: 0.012 }, thresholdKeV: 0.1 });
  const r = buildRedistribution({ spec, lineFits: [], energy: { minKeV: 0.2, maxKeV: 8, bins: 780, spacing: 'linear' }, channels: CHANNELS, meta: META });
  for (const e of [0.525, 1.4867, 4.5089]) {
    it(`recovers tail and shelf at ${e} keV`, () => {
      const f = refitProfileAt(r.rmf, e, { thresholdKeV: 0.1, start: { tailFraction: 0.05, tailScaleEv: 40, shelfFraction: 0.02 } })!;
      expect(f).not.toBeNull();
      const ft = tail.fractionAtZero * Math.exp(-e / tail.fractionScaleKeV);
      expect(Math.abs(f.tailFraction - ft)).toBeLessThan(0.002 + 0.02 * ft);
      if (ft > 0.01) expect(Math.abs(f.tailScaleEv - 60)).toBeLessThan(3);
      expect(Math.abs(f.shelfFraction - 0.012)).toBeLessThan(0.001);
    });
  }
});

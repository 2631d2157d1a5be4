/**
 * The merged core + tail component used by the matrix builder is the same mixture as the two
 * components it replaces (internal consistency; the components themselves are checked against
 * numerical integration in profile.test.ts).
 */
import { describe, expect, it } from 'vitest';
import { componentCdf, componentPdf, componentWindow, mergeCoreAndTail, profileComponents } from '../../generators/physics/profile.ts';

const PARAMS = { centroidKeV: 0.6, sigmaKeV: 0.028, tailFraction: 0.12, tailScaleKeV: 0.05, shelfFraction: 0.01, escapeFraction: 0, fluorescenceFraction: 0 };

describe('mergeCoreAndTail', () => {
  const parts = profileComponents(PARAMS, { shelfLowKeV: 0 });
  const merged = mergeCoreAndTail(parts);

  it('replaces exactly the core and the tail by one component of their total fraction', () => {
    expect(parts.map((c) => c.kind)).toEqual(['gaussian', 'tail', 'shelf']);
    expect(merged.map((c) => c.kind)).toEqual(['peak', 'shelf']);
    expect(merged.reduce((s, c) => s + c.fraction, 0)).toBeCloseTo(1, 15);
  });

  it('has the same CDF and density as the core and tail it replaces, to 1e-14', () => {
    const [lo, hi] = componentWindow(merged[0]);
    const peak = componentCdf(merged[0]);
    const sep = parts.slice(0, 2).map((c) => ({ f: c.fraction, G: componentCdf(c) }));
    for (let i = 0; i <= 2000; i++) {
      const x = lo - 0.01 + ((hi - lo + 0.02) * i) / 2000;
      const want = sep.reduce((s, c) => s + c.f * c.G(x), 0);
      expect(Math.abs(merged[0].fraction * peak(x) - want)).toBeLessThan(1e-14);
      const wantPdf = parts[0].fraction * componentPdf(parts[0], x) + parts[1].fraction * componentPdf(parts[1], x);
      expect(Math.abs(merged[0].fraction * componentPdf(merged[0], x) - wantPdf)).toBeLessThan(1e-10 * Math.max(1, wantPdf));
    }
  });

  it('leaves a profile without a tail as it is', () => {
    const noTail = profileComponents({ ...PARAMS, tailFraction: 0 }, { shelfLowKeV: 0 });
    expect(mergeCoreAndTail(noTail)).toEqual(noTail);
  });
});

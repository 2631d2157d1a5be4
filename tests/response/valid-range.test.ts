/** Valid range of a response: channels inside the energy grid (arithmetic on the grids, no source). */
import { describe, expect, it } from 'vitest';
import { validRange } from '../../generators/response/index.ts';

describe('complete-model range', () => {
  it("the demo's grids: 0.2–12 keV grid, 1024 × 15 eV channels from 0, threshold 0.1 keV", () => {
    const r = validRange({ count: 1024, firstChannel: 0, widthEv: 15, originEv: 0 }, { minKeV: 0.2, maxKeV: 12, bins: 800, spacing: 'linear' }, 0.1);
    // first channel starting at or above 0.2 keV: 14 (0.210 keV); last ending at or below 12 keV: 799
    expect(r.channels).toEqual([14, 799]);
    expect(r.energyKeV[0]).toBeCloseTo(0.21, 12);
    expect(r.energyKeV[1]).toBeCloseTo(12, 12);
    expect(r.consistent).toBe(false);
    expect(r.gaps.join('; ')).toBe('channels run to 15.36 keV but the energy grid stops at 12 keV; events are recorded from 0.1 keV but the energy grid starts at 0.2 keV');
  });

  it('consistent when the grid spans the recorded channels (within one channel)', () => {
    const r = validRange({ count: 800, firstChannel: 1, widthEv: 15, originEv: 0 }, { minKeV: 0.1, maxKeV: 12, bins: 800, spacing: 'linear' }, 0.1);
    expect(r.consistent).toBe(true);
    expect(r.channels).toEqual([8, 800]);
  });
});

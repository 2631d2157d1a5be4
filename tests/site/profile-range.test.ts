/** Default x range of the line-profile plots: worked out by hand in the comments. */
import { describe, expect, it } from 'vitest';
import { profileRange } from '../../src/lib/release-plots.ts';

describe('profileRange', () => {
  // Channels centred at 0.5, 1.5, …, 9.5 keV (1 keV wide). Two rows; the threshold zeroes channel 0.
  const channelEnergyKeV = Array.from({ length: 10 }, (_, i) => i + 0.5);
  const rows = [
    [0, 1e-3, 0.5, 1e-3, 0, 0, 0, 0, 0, 0],
    [0, 1e-9, 1e-5, 1e-5, 0.1, 0.6, 0.1, 1e-8, 0, 0],
  ];
  it('runs from half a channel below the first non-zero channel to a margin above the last one above the floor', () => {
    // First non-zero channel: index 1 (1.5 keV) → 1.5 − 0.5 = 1.0 keV.
    // Above the floor 1e-6: highest is index 6 (6.5 keV); shown span 6.5 − 1.5 = 5 keV, 4 % margin → 6.7 keV.
    expect(profileRange({ channelEnergyKeV, energiesKeV: [2.5, 5.5], rows }, 1e-6)).toEqual([1, 6.7]);
  });
  it('a lower floor reaches further (index 7 at 1e-8 → 7.5 + 0.04 × 6 = 7.74 keV)', () => {
    expect(profileRange({ channelEnergyKeV, energiesKeV: [2.5, 5.5], rows }, 1e-8)).toEqual([1, 7.74]);
  });
  it('gives no range for empty rows (the plot falls back to the data extent)', () => {
    expect(profileRange({ channelEnergyKeV, energiesKeV: [1], rows: [new Array(10).fill(0)] }, 1e-6)).toBeUndefined();
  });
});

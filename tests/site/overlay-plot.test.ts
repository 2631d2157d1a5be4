/**
 * The overlay plots and the curve thinning behind them, in-process on invented curves:
 * - thinIndices: every dropped point lies within the tolerance (vertically, in units of the
 *   curve's span, log energy) of the line through its kept neighbours — the definition the site
 *   documents state; a step (an absorption edge) keeps both of its sides;
 * - overlayPlot: one curve per detector plus each node's, every detector a colour and dash pair of
 *   its own (Okabe & Ito palette, src/lib/plot/palette.ts), axis titles with units, and past
 *   OVERLAY_MAX_REGION_CURVES node curves only the detectors, with a note saying so.
 */
import { describe, expect, it } from 'vitest';
import { thinIndices } from '../../generators/site-data/thin.ts';
import { overlayPlot, OVERLAY_MAX_REGION_CURVES } from '../../src/lib/release-plots.ts';
import type { OverlayDetector, ReleaseOverlayDoc } from '../../generators/site-data/types.ts';

const energies = Array.from({ length: 400 }, (_, i) => 0.2 * Math.pow(60, i / 399));

describe('thinIndices', () => {
  it('keeps every dropped point within the tolerance of the drawn line and both sides of a step', () => {
    const edge = 1.84;
    const y = energies.map((e) => (e < edge ? 0.8 : 0.6) * Math.exp(-e / 7) + 0.01 * Math.sin(5 * e));
    const tol = 1e-3;
    const keep = thinIndices(energies, [y], { tolerance: tol });
    expect(keep.length).toBeLessThan(energies.length / 2);
    const span = Math.max(...y) - Math.min(...y);
    const lx = energies.map(Math.log);
    for (let k = 0; k + 1 < keep.length; k++)
      for (let i = keep[k] + 1; i < keep[k + 1]; i++) {
        const [a, b] = [keep[k], keep[k + 1]];
        const line = y[a] + ((y[b] - y[a]) * (lx[i] - lx[a])) / (lx[b] - lx[a]);
        expect(Math.abs(y[i] - line) / span).toBeLessThanOrEqual(tol);
      }
    const j = energies.findIndex((e) => e >= edge);
    expect(keep).toContain(j);
    expect(keep).toContain(j - 1);
  });
});

const curve = (f: (e: number) => number) => ({ energyKeV: energies, values: energies.map(f) });
function det(i: number, nodes: number): OverlayDetector {
  return {
    id: `d${i}`,
    name: `Sensor ${i}`,
    kind: 'invented',
    fwhmEv: curve((e) => 50 + i + 10 * e),
    centroidOffsetEv: curve((e) => -i / e),
    regions: Array.from({ length: nodes }, (_, k) => ({ label: `d${i}-${k}`, node: String.fromCharCode(97 + k), rowBand: null, fwhmEv: curve((e) => 51 + i + k + 10 * e), centroidOffsetEv: curve(() => 0) })),
  };
}
const doc = (n: number, nodes: number): ReleaseOverlayDoc => ({ schema: 'kiln/release-overlay/1', release: '9.9.9', detectors: Array.from({ length: n }, (_, i) => det(i, nodes)) });

describe('overlayPlot', () => {
  it('draws each detector and each of its nodes, labelled, with axis units', () => {
    const p = overlayPlot(doc(2, 4), 'fwhm')!;
    expect(p.series.map((s) => s.label)).toEqual(['Sensor 0 (whole detector)', 'Sensor 0, node a', 'Sensor 0, node b', 'Sensor 0, node c', 'Sensor 0, node d', 'Sensor 1 (whole detector)', 'Sensor 1, node a', 'Sensor 1, node b', 'Sensor 1, node c', 'Sensor 1, node d']);
    expect([p.x.label, p.x.unit, p.y.label, p.y.unit]).toEqual(['Energy', 'keV', 'FWHM', 'eV']);
    expect(p.note).toBeUndefined();
    // No curve of the overlay without data: no tail curves were given.
    expect(overlayPlot(doc(2, 4), 'tail')).toBeNull();
  });
  it('past the node limit draws the detectors only, each with its own colour and dash, and says so', () => {
    const n = 9;
    const nodes = Math.ceil((OVERLAY_MAX_REGION_CURVES + 1) / n);
    const p = overlayPlot(doc(n, nodes), 'fwhm')!;
    expect(p.series.length).toBe(n);
    expect(new Set(p.series.map((s) => `${s.colour} ${s.dash ?? ''}`)).size).toBe(n);
    expect(p.note).toContain(`${n * nodes} readout-node curves are left out`);
  });
});

/**
 * The compare body rendered from the build's real documents (.kiln/out, or KILN_OUT): which plots it
 * draws, their units and A/B labels, and that the plotted differences are the published arrays
 * subtracted (nothing recomputed). Needs `kiln build` (npm run build) first.
 */
import { describe, expect, it } from 'vitest';
import { requireFreshOutput } from '../support/fresh-build.ts';
import { loadIndex, loadSite, loadValidation } from '../../src/lib/data.ts';
import { compareHtml, defaultPair } from '../../src/lib/compare/index.ts';
import { unpackSpec, type PlotSpec } from '../../src/lib/plot/index.ts';

const specs = (html: string): PlotSpec[] => [...html.matchAll(/<script type="application\/json" class="kplot-spec">(.*?)<\/script>/g)].map((m) => unpackSpec(JSON.parse(m[1])));

describe('compare page from the build output', () => {
  requireFreshOutput('the build output (.kiln/out or KILN_OUT)');
  const index = loadIndex();
  const [a, b] = defaultPair(index.releases)!;
  const sa = loadSite(a);
  const sb = loadSite(b);
  const html = compareHtml(sa, sb, loadValidation(a), loadValidation(b));
  const all = specs(html);

  it('shows ratios only for effective area; FWHM and centroid as differences in eV', () => {
    expect(all.length).toBe(4 * sa.detectors.length);
    for (const s of all) {
      expect(s.title, s.id).toContain(s.y.label.startsWith('Ratio') ? `B / A (${b} / ${a})` : `B − A (${b} − ${a})`);
      if (s.y.label.startsWith('Ratio')) expect(s.title).toMatch(/effective area ratio/);
      else expect(s.y.unit, s.id).toBe(/effective area/.test(s.title) ? 'cm²' : 'eV');
    }
    expect(html).not.toMatch(/FWHM ratio|Centroid energy ratio/i);
  });

  it('plots B − A of the published model arrays at the same energies', () => {
    const d = sa.detectors[0];
    const db = sb.detectors.find((x) => x.id === d.id)!;
    const fw = all.find((s) => s.id === `cmp-fw-d-${d.id}`)!;
    const ce = all.find((s) => s.id === `cmp-ce-d-${d.id}`)!;
    // Same grid in the demo releases; each drawn point is one of the published energies.
    expect(db.resolution.energyKeV).toEqual(d.resolution.energyKeV);
    for (const [spec, key] of [[fw, 'fwhmEv'], [ce, 'centroidOffsetEv']] as const)
      spec.series[0].x.forEach((x, k) => {
        const i = d.resolution.energyKeV.findIndex((e) => Math.abs(e - x) <= 1e-4 * e);
        expect(i, `${spec.id} x=${x}`).toBeGreaterThanOrEqual(0);
        // Rounded to 6 significant digits for display: tolerance 1e-5 relative plus 1e-9 eV.
        const want = db.resolution[key][i] - d.resolution[key][i];
        expect(Math.abs((spec.series[0].y[k] as number) - want)).toBeLessThanOrEqual(1e-5 * Math.abs(want) + 1e-9);
      });
  });

  it('says so when a release is compared with itself', () => {
    const self = compareHtml(sa, sa, loadValidation(a), loadValidation(a));
    expect(self).toContain('Identical in A and B for every epoch');
    expect(self).toContain('Identical model FWHM in A and B: the difference is 0 eV at every energy');
    expect(self).toContain('Both releases have the same checks with the same results.');
  });
});

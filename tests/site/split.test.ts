/**
 * Site data split per product (generators/site-data/split.ts): the pieces join back into the whole
 * release, and checks land with the detector of their product (the finder's documents:
 * finder-chunks.test.ts). Hand-made inputs; expected values by inspection.
 */
import { describe, expect, it } from 'vitest';
import { checksByDetector, joinRelease, splitRelease } from '../../generators/site-data/split.ts';
import type { Check, DetectorSite, ProductSummary, ReleaseSite } from '../../generators/site-data/types.ts';

const product = (id: string, detector: string, epoch: string, kind: 'rmf' | 'arf'): ProductSummary => ({ id, kind, detector, epoch, path: `files/${id}.gz`, bytes: 1, sha256: '0'.repeat(64), validFrom: '2026-01-01', validTo: null });
const check = (id: string, product: string | null, status: Check['status'] = 'pass'): Check => ({ id, title: id, product, status, measured: null, tolerance: null, unit: null, message: '' });
const detector = (id: string, epochs: string[]): DetectorSite => ({
  id,
  name: id.toUpperCase(),
  kind: 'CCD',
  epochs: epochs.map((e, i) => ({ id: e, date: `2026-0${i + 1}-01`, validFrom: `2026-0${i + 1}-01`, validTo: null, energyKeV: [1, 2], mirrorCm2: [3, 4], components: [{ name: 'f', kind: 'filter', values: [0.5, 0.6] }], detectorQE: [0.7, 0.8], effectiveAreaCm2: [i + 1, i + 2] })),
  resolution: { energyKeV: [1], fwhmEv: [100], centroidOffsetEv: [0] },
  lineFits: [],
  fitQuality: { fwhmChi2: 0, fwhmDof: 0, centroidChi2: 0, centroidDof: 0 },
  profiles: { channelEnergyKeV: [1], energiesKeV: [1], rows: [[1]] },
  matrix: { path: null, log10: [[0]], energyKeV: [1, 2], channelEnergyKeV: [1, 2], log10Range: [-7, 0] },
});
const products = [product('a-rmf', 'a', 'all', 'rmf'), product('a-e1-arf', 'a', 'e1', 'arf'), product('b-rmf', 'b', 'all', 'rmf')];
const site: ReleaseSite = {
  schema: 'kiln/release-site/1',
  id: '1.0.0',
  instrument: 'inst',
  title: 't',
  date: '2026-01-01',
  status: 'draft',
  validFrom: '2026-01-01',
  validTo: null,
  supersedes: null,
  notesMarkdown: '',
  parameters: [{ detector: 'a', group: 'g', name: 'n', symbol: null, unit: '', value: 1, uncertainty: null, source: 'input' }],
  detectors: [detector('a', ['e1']), detector('b', [])],
  products,
};
const checks = [check('x', null), check('y', 'a-e1-arf', 'warn'), check('z', 'b-rmf'), check('w', 'gone-rmf', 'fail')];

describe('split and join', () => {
  const docs = splitRelease(site, checks);
  const byPath = new Map(docs.map((d) => [d.path, d.doc]));
  it('writes a summary, the overlay, five documents per detector and one per epoch', () => {
    expect([...byPath.keys()].sort()).toEqual(
      ['summary.json', 'overlay.json', ...['a', 'b'].flatMap((d) => ['model', 'profiles', 'matrix', 'checks', 'area'].map((f) => `detectors/${d}/${f}.json`)), 'detectors/a/epochs/e1.json'].sort(),
    );
  });
  it('joins back into the same release, checks release-level first', () => {
    const joined = joinRelease(byPath.get('summary.json') as never, <T,>(p: string) => byPath.get(p) as T);
    expect(joined.site).toEqual(site);
    // Release-level and unknown-product checks stay with the release; the others with their detector.
    expect(joined.checks.map((c) => c.id)).toEqual(['x', 'w', 'y', 'z']);
  });
  it('counts each detector\'s checks and the release total', () => {
    const s = byPath.get('summary.json') as { counts: Record<string, number>; detectors: { id: string; checks: Record<string, number>; products: number }[] };
    expect(s.counts).toEqual({ pass: 2, fail: 1, warn: 1, review: 0, accepted: 0 });
    expect(s.detectors.map((d) => [d.id, d.products, d.checks.warn])).toEqual([['a', 2, 1], ['b', 1, 0]]);
  });
  it('checksByDetector puts null and unknown products under null', () => {
    const m = checksByDetector(checks, products);
    expect(m.get(null)!.map((c) => c.id)).toEqual(['x', 'w']);
    expect(m.get('a')!.map((c) => c.id)).toEqual(['y']);
  });
});

/**
 * The demo content tree loads, resolves as documented, agrees with its stated truth, and its
 * committed data files are exactly what the committed scripts make. The documents are also read
 * with js-yaml (the YAML reader Astro's content collections use) to check that the shared zod
 * schemas give the same documents through both readers.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
// @ts-expect-error js-yaml (Astro's YAML reader) ships no type declarations
import yamlJs from 'js-yaml';
import { describe, expect, it } from 'vitest';
import { compareSemver, instrumentSchema, loadContent, loadInstrumentFile, parseInstrumentText, parseReleaseText, releaseSchema } from '../../generators/content/index.ts';
import { DEMO_TRUTH } from '../../scripts/demo-truth.ts';
import { demoLineFitsCsv } from '../../scripts/make-demo-linefits.ts';
import { makeMirrorAreaCsv } from '../../scripts/make-demo-mirror-area.ts';
import { DEMO_CONTENT, INSTRUMENT, MIRROR, rel } from './helpers.ts';

const tree = await loadContent(DEMO_CONTENT);

describe('demo content', () => {
  it('loads one instrument and four releases in semver order with their history', () => {
    expect(tree.instruments.map((i) => i.id)).toEqual(['quillon-tarncam']);
    expect(tree.releases.map((r) => [r.release.id, r.release.status, r.release.supersedes])).toEqual([
      ['1.0.0', 'superseded', null],
      ['1.1.0', 'published', '1.0.0'],
      ['2.0.0', 'candidate', '1.1.0'],
      ['2.1.0', 'candidate', '2.0.0'],
    ]);
    const ins = tree.instruments[0];
    expect(ins.channels).toEqual({ count: 1024, firstChannel: 0, widthEv: 15, originEv: 0 });
    expect(ins.energyGrid).toEqual({ minKeV: 0.2, maxKeV: 12, bins: 800, spacing: 'linear' });
    expect(ins.detectors.map((d) => d.kind)).toEqual(['front-illuminated CCD', 'back-illuminated CCD']);
  });

  it('lists every input file with its bytes, sorted, for hashing', () => {
    const r = tree.releases[1];
    expect(r.inputs.map((f) => f.path)).toEqual([
      INSTRUMENT,
      MIRROR,
      rel('1.1.0', 'linefits/bi1.csv'),
      rel('1.1.0', 'linefits/fi0.csv'),
      rel('1.1.0', 'notes.md'),
      rel('1.1.0'),
    ]);
    for (const f of r.inputs) expect(Buffer.from(f.bytes).equals(readFileSync(join(DEMO_CONTENT, f.path)))).toBe(true);
  });

  it('applies the overrides: contamination appears in flight, layers keep their kinds, sources switch', () => {
    const [r10, r11, r20] = tree.releases;
    expect(r10.detectors.every((d) => d.stack.contamination === null)).toBe(true);
    const fi11 = r11.detectors.find((d) => d.id === 'fi0')!;
    expect(fi11.stack.contamination?.law).toEqual({ kind: 'exponential', startDate: '2026-05-12', initialUm: 0, asymptoticUm: 0.45, timescaleDays: 420 });
    expect(fi11.stack.filters.map((l) => [l.name, l.kind])).toEqual([
      ['blocking-polyimide', 'filter'],
      ['blocking-aluminium', 'filter'],
    ]);
    expect(fi11.stack.surface.every((l) => l.kind === 'surface')).toBe(true);
    // Field-by-field merge keeps what the override does not name.
    expect(fi11.redistribution.fwhm).toEqual({ source: 'law', readNoiseE: 3.9, fano: 0.118, sigma0Ev: 18, pixelsPerEvent: { a: 1.2, bPerKeV: 0.35 } });
    const bi = (r: typeof r10) => r.detectors.find((d) => d.id === 'bi1')!.redistribution;
    expect([bi(r10).centroid.source, bi(r10).tail.source]).toEqual(['line-fits', 'line-fits']);
    expect([bi(r11).centroid.source, bi(r11).tail.source]).toEqual(['law', 'line-fits']);
    expect([bi(r20).centroid.source, bi(r20).tail.source, bi(r20).shelf]).toEqual(['law', 'collection', { source: 'law', fraction: 0.015 }]);
    expect(r20.detectors.find((d) => d.id === 'bi1')!.stack.sensor.partial).toEqual({ thicknessUm: 0.055, collectionAtSurface: 0.79 });
    expect(r20.detectors[0].epochs.map((e) => e.id)).toEqual(['e1', 'e2', 'e3', 'e4']);
    expect(r10.release.notesMarkdown).toMatch(/invented/i);
  });

  it('states the truth wherever a release uses a law', () => {
    for (const t of DEMO_TRUTH) {
      const r = tree.releases.find((x) => x.release.id === t.release)!;
      for (const d of r.detectors) {
        const truth = t.detectors[d.id];
        const red = d.redistribution;
        expect(red.pairEnergyEv).toBe(truth.pairEnergyEv);
        const { source: _s, ...fwhm } = red.fwhm;
        expect(fwhm).toEqual(truth.fwhm);
        if (red.centroid.source === 'law') expect({ ...red.centroid, source: undefined }).toEqual({ ...truth.centroid, source: undefined });
        if (red.tail.source === 'law') expect({ ...red.tail, source: undefined }).toEqual({ ...truth.tail, source: undefined });
        if (red.shelf.source === 'law') expect(red.shelf.fraction).toBe(truth.shelf.fraction);
      }
    }
  });

  it('commits exactly the line fits and mirror table the scripts make', async () => {
    for (const t of DEMO_TRUTH)
      for (const det of Object.keys(t.detectors)) {
        expect(readFileSync(join(DEMO_CONTENT, rel(t.release, `linefits/${det}.csv`)), 'utf8'), `${t.release}/${det}`).toBe(await demoLineFitsCsv(t, det));
      }
    expect(readFileSync(join(DEMO_CONTENT, MIRROR), 'utf8')).toBe(makeMirrorAreaCsv());
  });

  it('loads an instrument file on its own', async () => {
    const ins = await loadInstrumentFile(join(DEMO_CONTENT, INSTRUMENT));
    expect(ins.mirror.energyKeV.length).toBe(ins.mirror.areaCm2.length);
    // The invented mirror peaks near 1.5 keV at a few hundred cm².
    const peak = ins.mirror.areaCm2.indexOf(Math.max(...ins.mirror.areaCm2));
    expect(ins.mirror.energyKeV[peak]).toBeCloseTo(1.5, 5);
    expect(ins.mirror.areaCm2[peak]).toBeGreaterThan(200);
    expect(ins.mirror.areaCm2[peak]).toBeLessThan(1000);
  });

  it('gives the same documents through js-yaml (Astro) and through our reader', () => {
    const ins = readFileSync(join(DEMO_CONTENT, INSTRUMENT), 'utf8');
    expect(instrumentSchema.parse(yamlJs.load(ins))).toEqual(parseInstrumentText(ins, INSTRUMENT).doc);
    for (const id of ['1.0.0', '1.1.0', '2.0.0', '2.1.0']) {
      const text = readFileSync(join(DEMO_CONTENT, rel(id)), 'utf8');
      // js-yaml reads unquoted dates as Date objects; the schema turns them back into ISO dates.
      expect(releaseSchema.parse(yamlJs.load(text))).toEqual(parseReleaseText(text, rel(id)).doc);
    }
  });
});

describe('semantic version order', () => {
  it('follows the precedence example of semver.org §11', () => {
    // Semantic Versioning 2.0.0, §11: 1.0.0-alpha < 1.0.0-alpha.1 < 1.0.0-alpha.beta < 1.0.0-beta
    // < 1.0.0-beta.2 < 1.0.0-beta.11 < 1.0.0-rc.1 < 1.0.0; and 1.0.0 < 2.0.0 < 2.1.0 < 2.1.1.
    const ordered = ['1.0.0-alpha', '1.0.0-alpha.1', '1.0.0-alpha.beta', '1.0.0-beta', '1.0.0-beta.2', '1.0.0-beta.11', '1.0.0-rc.1', '1.0.0', '2.0.0', '2.1.0', '2.1.1'];
    const shuffled = [...ordered].reverse();
    shuffled.sort(compareSemver);
    expect(shuffled).toEqual(ordered);
  });
});

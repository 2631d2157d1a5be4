/**
 * Products state their validity in Kiln's own keywords (README, "Keywords Kiln writes") and carry
 * no other archive's indexing keywords. The forbidden families are the index keywords of
 * calibration databases (the CAL/GEN/92-011 set of validity date/time, boundary, class, code
 * name, data type and description keywords, from memory); RMF/ARF layouts need none of them
 * (OGIP CAL/GEN/92-002). Checked on every product the demo's unpublished releases build.
 */
import { describe, expect, it } from 'vitest';
import { join } from 'node:path';
import { loadContent } from '../../generators/content/load.ts';
import { jobsOf } from '../../generators/pipeline/inputs.ts';
import { buildDetectorProducts } from '../../generators/pipeline/product.ts';
import { readFits } from '../../generators/fits/index.ts';

const FORBIDDEN = /^(CVSD|CVST|CBD|CCLS|CCNM|CDTP|CDES)\d*/;
const CONTENT = process.env.KILN_TEST_CONTENT ?? join(import.meta.dirname, '../../content');

describe('validity keywords of built products', async () => {
  const content = await loadContent(CONTENT);
  const open = content.releases.filter((r) => r.release.status !== 'published' && r.release.status !== 'superseded' && r.release.status !== 'withdrawn');
  const job = jobsOf(open[open.length - 1])[0];
  const built = buildDetectorProducts(job);

  it('there is something to check', () => {
    expect(open.length).toBeGreaterThan(0);
    expect(built.files.length).toBeGreaterThan(1);
  });

  it("no product carries another archive's indexing keywords", () => {
    for (const f of built.files)
      for (const hdu of readFits(f.fits).hdus)
        for (const c of hdu.header.cards) expect(FORBIDDEN.test(c.keyword), `${f.name}: ${c.keyword}`).toBe(false);
  });

  it('every product states its dates and complete-model range in Kiln keywords; matrices also the channels', () => {
    for (const f of built.files) {
      const ext = readFits(f.fits).hdus[1].header;
      expect(ext.get('KVALFROM')).toBe(f.validFrom);
      expect(ext.get('KVALTO')).toBe(f.validTo ?? 'open');
      expect(ext.get('KEVALLO')).toBeCloseTo(f.validEnergyKeV![0], 9);
      expect(ext.get('KEVALHI')).toBeCloseTo(f.validEnergyKeV![1], 9);
      if (f.kind === 'arf') expect(ext.get('KCHVALLO')).toBeUndefined();
      else expect([ext.get('KCHVALLO'), ext.get('KCHVALHI')]).toEqual(f.validChannels);
    }
  });

  it('the forbidden pattern matches the keyword the products used to carry (so the test can fail)', () => {
    expect(FORBIDDEN.test('CVSD0001')).toBe(true);
    expect(FORBIDDEN.test('KVALFROM')).toBe(false);
  });
});

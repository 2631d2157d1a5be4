/**
 * The benchmark's generated instrument (scripts/make-large-instrument.ts) must stay valid content
 * as the demo it clones evolves: a stale clone (a per-detector check setting naming the demo's
 * detectors) once made `npm run bench` fail on its first build. Loading is enough; no products.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { makeLargeInstrument } from '../../scripts/make-large-instrument.ts';
import { loadContent } from '../../generators/content/index.ts';

const dir = mkdtempSync(join(tmpdir(), 'kiln-large-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('generated bench instrument', () => {
  it('3 detectors × 2 epochs load as valid content with every detector and epoch', async () => {
    const products = makeLargeInstrument(join(dir, 'content'), { detectors: 3, epochs: 2, channels: 256, bins: 200 });
    expect(products).toBe(3 * (1 + 2));
    const tree = await loadContent(join(dir, 'content'));
    expect(tree.instruments[0].detectors.map((d) => d.id)).toEqual(['c001', 'c002', 'c003']);
    expect(tree.releases).toHaveLength(1);
    expect(tree.releases[0].release.epochs.map((e) => e.id)).toEqual(['m01', 'm02']);
  });
});

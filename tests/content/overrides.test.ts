/**
 * A release restating instrument inputs (release.yaml `overrides:`): mirror table, grids and the
 * model of every detector, with the same merge rules as a detector's own `model`. The expected
 * values are the ones written into the scratch files here; the archived demo releases must keep
 * their fingerprints (their seals were written before overrides existed).
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterEach, describe, expect, it } from 'vitest';
import { loadContent } from '../../generators/content/index.ts';
import { KilnInputError } from '../../generators/errors.ts';
import { inputsSha256 } from '../../generators/pipeline/inputs.ts';
import { DEMO_CONTENT, MIRROR, rel, scratchCopy, type Scratch } from './helpers.ts';

const CANDIDATE = rel('2.0.0');
let s: Scratch | null = null;
afterEach(() => {
  s?.dispose();
  s = null;
});

/** Appends a top-level block to the candidate's release.yaml. */
const addOverrides = (sc: Scratch, yaml: string) => sc.write(CANDIDATE, `${sc.read(CANDIDATE)}\noverrides:\n${yaml}\n`);

describe('release overrides of instrument inputs', () => {
  it('a restated mirror table replaces the instrument one for that release only, as its input file', async () => {
    s = scratchCopy();
    // The instrument's table with every area × 0.9: a correction a team would publish.
    const scaled = s
      .read(MIRROR)
      .trim()
      .split('\n')
      .map((l) => {
        if (!/^\d/.test(l)) return l; // comments and the header
        const [e, a] = l.split(',');
        return `${e},${(Number(a) * 0.9).toPrecision(8)}`;
      })
      .join('\n');
    s.write(rel('2.0.0', 'mirror-area-v2.csv'), scaled + '\n');
    addOverrides(s, '  mirrorArea: mirror-area-v2.csv');
    const tree = await loadContent(s.root);
    const byId = new Map(tree.releases.map((r) => [r.release.id, r]));
    const base = byId.get('1.1.0')!.instrument.mirror.areaCm2;
    const mine = byId.get('2.0.0')!.instrument.mirror.areaCm2;
    expect(mine.length).toBe(base.length);
    mine.forEach((a, i) => expect(a).toBeCloseTo(base[i] * 0.9, 4));
    const paths = byId.get('2.0.0')!.inputs.map((f) => f.path);
    expect(paths).toContain('releases/2.0.0/mirror-area-v2.csv');
    expect(paths).not.toContain(MIRROR);
    expect(byId.get('1.1.0')!.inputs.map((f) => f.path)).toContain(MIRROR);
  });

  it('grids merge field by field; a base model applies to every detector and a detector override wins', async () => {
    s = scratchCopy();
    addOverrides(s, ['  energyGrid: { bins: 700 }', '  channels: { widthEv: 7.5 }', '  model:', '    redistribution:', '      fwhm: { fano: 0.125 }', '      escape: false'].join('\n'));
    const tree = await loadContent(s.root);
    const r = tree.releases.find((x) => x.release.id === '2.0.0')!;
    const ins = tree.instruments[0];
    expect(r.instrument.energyGrid).toEqual({ ...ins.energyGrid, bins: 700 });
    expect(r.instrument.channels).toEqual({ ...ins.channels, widthEv: 7.5 });
    for (const d of r.detectors) {
      expect(d.redistribution.fwhm.fano, d.id).toBe(0.125);
      expect(d.redistribution.escape, d.id).toBe(false);
    }
    // 2.0.0's own per-detector read noise (3.9 and 4.3 e⁻ in its release.yaml) still applies on top.
    expect(r.detectors.map((d) => d.redistribution.fwhm.readNoiseE)).toEqual([3.9, 4.3]);
  });

  it('a bad merged grid names release.yaml, the override field and its line', async () => {
    s = scratchCopy();
    addOverrides(s, '  energyGrid: { maxKeV: 0.1 }');
    const err = await loadContent(s.root).then(() => null, (e: unknown) => e);
    expect(err).toBeInstanceOf(KilnInputError);
    const e = err as KilnInputError;
    expect(e.where.file).toBe(join(s.root, CANDIDATE));
    expect(e.where.field).toBe('overrides.energyGrid.maxKeV');
    expect(e.where.line).toBe(s.lineOf(CANDIDATE, 'maxKeV: 0.1'));
    expect(e.oneLine()).toMatch(/maxKeV > minKeV/);
  });

  it('a bad value in the shared model names its overrides.model path in release.yaml', async () => {
    s = scratchCopy();
    addOverrides(s, ['  model:', '    stack:', '      sensor: { depletionUm: -3 }'].join('\n'));
    const err = await loadContent(s.root).then(() => null, (e: unknown) => e);
    const e = err as KilnInputError;
    expect(e).toBeInstanceOf(KilnInputError);
    expect(e.where.file).toBe(join(s.root, CANDIDATE));
    expect(e.where.field).toMatch(/^overrides\.model\.stack\.sensor\.depletionUm$/);
    expect(e.where.line).toBe(s.lineOf(CANDIDATE, 'depletionUm: -3'));
  });

  it('the archived demo releases keep the fingerprints their seals recorded', async () => {
    const tree = await loadContent(DEMO_CONTENT);
    for (const id of ['1.0.0', '1.1.0']) {
      const seal = JSON.parse(readFileSync(join(DEMO_CONTENT, 'archive', id, 'seal.json'), 'utf8')) as { inputsSha256: string };
      expect(inputsSha256(tree.releases.find((r) => r.release.id === id)!), id).toBe(seal.inputsSha256);
    }
  });
});

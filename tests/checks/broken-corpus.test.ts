/**
 * The broken-product corpus (tests/fixtures/broken, written by scripts/make-broken-products.ts):
 * `kiln check` must exit 1 naming the specific failed check for each fault, and 0 for the clean
 * references. Each fault is confirmed independently with astropy (Debian python3-astropy), which
 * reads the same bytes with its own FITS reader and checksum code: the fault is really in the file,
 * and (except for the checksum fault) the file is otherwise valid FITS with correct checksums.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runAstropyChecks, runPythonJson } from '../support/python.ts';
import { makeFixtures } from '../../scripts/make-broken-products.ts';
import { BROKEN, kilnCheck } from './cli-helpers.ts';

/** file → the check id that must fail. The rules are OGIP CAL/GEN/92-002/92-002a and OGIP/92-007 (memory) and the FITS checksum convention. */
const EXPECTED: Record<string, string> = {
  'missing-ebounds.rmf': 'rmf.ext.ebounds',
  'wrong-hduclas2.rmf': 'rmf.matrix.keyword.hduclas2',
  'no-energ-lo-unit.rmf': 'rmf.matrix.unit.energ_lo',
  'wrong-energ-lo-unit.rmf': 'rmf.matrix.unit.energ_lo',
  'row-sum-above-1.rmf': 'rmf.rows.sum-le-1',
  'negative-element.rmf': 'rmf.matrix.nonnegative',
  'nan-specresp.arf': 'arf.specresp.finite',
  'wrong-specresp-unit.arf': 'arf.specresp.unit.specresp',
  'grid-gap.rmf': 'rmf.grid.contiguous',
  'f-chan-out-of-range.rmf': 'rmf.channels.range',
  'ebounds-not-monotonic.rmf': 'rmf.ebounds.monotonic',
  'detchans-mismatch.rmf': 'rmf.detchans.agree',
  'bad-datasum.rmf': 'fits.datasum',
  'no-exposure.pha': 'pha.spectrum.keyword.exposure',
};
const CLEAN = ['clean.rmf', 'clean.arf', 'clean.pha'];

describe('kiln check on the broken corpus', () => {
  it('has at least 10 kinds of fault', () => {
    expect(new Set(Object.values(EXPECTED)).size).toBeGreaterThanOrEqual(10);
  });

  for (const [file, id] of Object.entries(EXPECTED)) {
    it(`${file}: exits 1 and fails ${id}`, () => {
      const r = kilnCheck(join(BROKEN, file));
      expect(r.status, r.stderr).toBe(1);
      expect(r.stdout).toMatch(new RegExp(`^\\s*FAIL\\s+${id.replace(/\./g, '\\.')}\\s`, 'm'));
      const j = kilnCheck('--json', join(BROKEN, file));
      expect(j.status).toBe(1);
      const report = JSON.parse(j.stdout);
      const failed = report.files[0].checks.filter((c: { status: string }) => c.status === 'fail').map((c: { id: string }) => c.id);
      expect(failed).toContain(id);
    });
  }

  for (const file of CLEAN) {
    it(`${file}: exits 0 with no failed or warned check`, () => {
      const r = kilnCheck('--json', join(BROKEN, file));
      expect(r.status, r.stdout + r.stderr).toBe(0);
      const report = JSON.parse(r.stdout);
      expect(report.counts.fail).toBe(0);
      expect(report.counts.warn).toBe(0);
      expect(report.counts.pass).toBeGreaterThan(10);
    });
  }

  it('checks several files at once and exits 1 when any fails', () => {
    const r = kilnCheck(join(BROKEN, 'clean.rmf'), join(BROKEN, 'grid-gap.rmf'));
    expect(r.status).toBe(1);
    expect(r.stdout).toMatch(/total: 2 files/);
  });
});

describe('corpus is reproducible from the committed script', () => {
  it('makeFixtures() gives the committed bytes', () => {
    for (const f of makeFixtures()) {
      const committed = new Uint8Array(readFileSync(join(BROKEN, f.file)));
      expect(Buffer.compare(Buffer.from(committed), Buffer.from(f.bytes)), f.file).toBe(0);
    }
  });
});

interface AstropyFacts {
  [file: string]: {
    fitsValid: string | null;
    checksumWarnings: string[];
    extnames: string[];
    facts: Record<string, unknown>;
  };
}

const ASTROPY_FACTS = `
import json, sys, warnings, numpy as np
from astropy.io import fits
d = json.load(sys.stdin)
out = {}
def rows_matrix(h):
    return [np.asarray(x, dtype=float) for x in h.data['MATRIX']]
for name in d['files']:
    path = d['dir'] + '/' + name
    with warnings.catch_warnings(record=True) as w:
        warnings.simplefilter('always')
        hl = fits.open(path, checksum=True)
        for h in hl:
            h.data  # force reading so datasum is verified
        msgs = [str(x.message) for x in w if 'checksum' in str(x.message).lower() or 'datasum' in str(x.message).lower()]
    try:
        hl.verify('exception'); valid = None
    except Exception as e:
        valid = str(e)
    f = {}
    names = [h.name for h in hl]
    if 'MATRIX' in names:
        m = hl['MATRIX']
        rows = rows_matrix(m)
        f['maxRowSum'] = float(max(r.sum() for r in rows))
        f['minElement'] = float(min(r.min() for r in rows if r.size))
        lo = np.asarray(m.data['ENERG_LO'], float); hi = np.asarray(m.data['ENERG_HI'], float)
        f['maxGapKeV'] = float(np.max(np.abs(hi[:-1] - lo[1:])))
        f['energLoUnit'] = m.columns['ENERG_LO'].unit
        f['hduclas2'] = m.header.get('HDUCLAS2')
        f['detchans'] = m.header.get('DETCHANS')
        n = m.columns.names.index('F_CHAN') + 1
        tlmin = m.header.get('TLMIN%d' % n, 1)
        last = [int(np.max(np.asarray(fc) + np.asarray(nc) - 1)) for fc, nc in zip(m.data['F_CHAN'], m.data['N_CHAN'])]
        f['maxLastChannel'] = max(last)
        f['lastAllowedChannel'] = int(tlmin + m.header['DETCHANS'] - 1)
    if 'EBOUNDS' in names:
        e = hl['EBOUNDS']
        f['eboundsRows'] = len(e.data)
        f['minEminStep'] = float(np.min(np.diff(np.asarray(e.data['E_MIN'], float))))
    if 'SPECRESP' in names:
        s = hl['SPECRESP']
        f['nanSpecresp'] = int(np.isnan(np.asarray(s.data['SPECRESP'], float)).sum())
        f['specrespUnit'] = s.columns['SPECRESP'].unit
    if 'SPECTRUM' in names:
        f['hasExposure'] = 'EXPOSURE' in hl['SPECTRUM'].header
    out[name] = {'fitsValid': valid, 'checksumWarnings': msgs, 'extnames': names, 'facts': f}
print(json.dumps(out))
`;

describe.runIf(runAstropyChecks)('astropy confirms each fault is real (independent FITS reader)', () => {
  const files = [...CLEAN, ...Object.keys(EXPECTED)];
  const facts = () => runPythonJson<AstropyFacts>('astropy', ASTROPY_FACTS, { dir: BROKEN, files });
  let cache: AstropyFacts | null = null;
  const get = (f: string) => (cache ??= facts())[f];

  it('every file is valid FITS to astropy; only bad-datasum.rmf fails its checksums', () => {
    for (const f of files) {
      expect(get(f).fitsValid, f).toBeNull();
      if (f === 'bad-datasum.rmf') expect(get(f).checksumWarnings.some((m) => /datasum/i.test(m)), f).toBe(true);
      else expect(get(f).checksumWarnings, f).toEqual([]);
    }
  });
  it('clean.rmf: astropy sees row sums ≤ 1, no negative element, contiguous grid', () => {
    const c = get('clean.rmf').facts;
    expect(c.maxRowSum as number).toBeLessThanOrEqual(1);
    expect(c.minElement as number).toBeGreaterThanOrEqual(0);
    expect(c.maxGapKeV as number).toBeLessThan(1e-6);
  });
  it('missing-ebounds.rmf: no EBOUNDS HDU', () => expect(get('missing-ebounds.rmf').extnames).not.toContain('EBOUNDS'));
  it('wrong-hduclas2.rmf: HDUCLAS2 is not RSP_MATRIX', () => expect(get('wrong-hduclas2.rmf').facts.hduclas2).toBe('SPECRESP'));
  it('no-energ-lo-unit.rmf: ENERG_LO has no unit', () => expect(get('no-energ-lo-unit.rmf').facts.energLoUnit ?? null).toBeNull());
  it('wrong-energ-lo-unit.rmf: ENERG_LO unit eV', () => expect(get('wrong-energ-lo-unit.rmf').facts.energLoUnit).toBe('eV'));
  it('row-sum-above-1.rmf: astropy sums a row above 1', () => expect(get('row-sum-above-1.rmf').facts.maxRowSum as number).toBeGreaterThan(1.2));
  it('negative-element.rmf: astropy reads a negative element', () => expect(get('negative-element.rmf').facts.minElement as number).toBeLessThan(0));
  it('nan-specresp.arf: astropy reads one NaN', () => expect(get('nan-specresp.arf').facts.nanSpecresp).toBe(1));
  it('wrong-specresp-unit.arf: unit cm', () => expect(get('wrong-specresp-unit.arf').facts.specrespUnit).toBe('cm'));
  it('grid-gap.rmf: astropy sees a gap', () => expect(get('grid-gap.rmf').facts.maxGapKeV as number).toBeGreaterThan(0.005));
  it('f-chan-out-of-range.rmf: a group runs past TLMIN+DETCHANS−1', () => {
    const f = get('f-chan-out-of-range.rmf').facts;
    expect(f.maxLastChannel as number).toBeGreaterThan(f.lastAllowedChannel as number);
  });
  it('ebounds-not-monotonic.rmf: E_MIN decreases somewhere', () => expect(get('ebounds-not-monotonic.rmf').facts.minEminStep as number).toBeLessThan(0));
  it('detchans-mismatch.rmf: DETCHANS ≠ EBOUNDS rows', () => {
    const f = get('detchans-mismatch.rmf').facts;
    expect(f.detchans).not.toBe(f.eboundsRows);
  });
  it('no-exposure.pha: no EXPOSURE keyword', () => expect(get('no-exposure.pha').facts.hasExposure).toBe(false));
});

/**
 * Files Kiln did not write: astropy (Debian python3-astropy) writes an RMF with fixed-width
 * F_CHAN/N_CHAN/MATRIX columns (one group per row, the matrix padded with zeros to a fixed width),
 * an ARF and a PHA, following OGIP CAL/GEN/92-002/92-002a and OGIP/92-007 as remembered; `kiln
 * check` must accept them. A copy without checksums must still exit 0 (warnings only), and a
 * deliberately broken copy must fail.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runAstropyChecks, runPythonJson } from '../support/python.ts';
import { kilnCheck } from './cli-helpers.ts';

const WRITE_FOREIGN = `
import json, sys, numpy as np
from astropy.io import fits
from math import erf, sqrt
d = json.load(sys.stdin)
out = d['dir']
nchan, width, first = 128, 0.08, 0   # channels numbered from 0 this time
lo = np.arange(0.3, 9.3, 0.1); hi = lo + 0.1
emin = np.arange(nchan) * width; emax = emin + width
W = 24  # fixed width of the MATRIX column
fch, nch, mat = [], [], []
for e in 0.5 * (lo + hi):
    s = np.sqrt(0.06**2 + 0.0012 * e) / 2.3548
    p = np.array([0.5 * (erf((b - e) / (sqrt(2) * s)) - erf((a - e) / (sqrt(2) * s))) for a, b in zip(emin, emax)])
    k = int(np.argmax(p)); a = max(0, k - W // 2); b = min(nchan, a + W); a = b - W
    row = np.zeros(W, dtype=np.float32); row[:] = p[a:b] * 0.95
    fch.append(a + first); nch.append(W); mat.append(row)
def hdr(h, cls2, vers):
    for k, v in [('TELESCOP', 'OTHERSAT'), ('INSTRUME', 'OTHERCAM'), ('FILTER', 'NONE'), ('CHANTYPE', 'PHA'),
                 ('DETCHANS', nchan), ('HDUCLASS', 'OGIP'), ('HDUCLAS1', 'RESPONSE'), ('HDUCLAS2', cls2), ('HDUVERS', vers)]:
        h[k] = v
m = fits.BinTableHDU.from_columns([
    fits.Column('ENERG_LO', 'E', unit='keV', array=lo), fits.Column('ENERG_HI', 'E', unit='keV', array=hi),
    fits.Column('N_GRP', 'I', array=np.ones(len(lo), dtype=np.int16)),
    fits.Column('F_CHAN', 'J', array=np.array(fch, dtype=np.int32)), fits.Column('N_CHAN', 'J', array=np.array(nch, dtype=np.int32)),
    fits.Column('MATRIX', '%dE' % W, array=np.array(mat))], name='MATRIX')
hdr(m.header, 'RSP_MATRIX', '1.3.0'); m.header['HDUCLAS3'] = 'REDIST'; m.header['LO_THRES'] = 0.0
m.header['TLMIN4'] = first; m.header['TLMAX4'] = first + nchan - 1
eb = fits.BinTableHDU.from_columns([fits.Column('CHANNEL', 'I', array=np.arange(nchan, dtype=np.int16) + first),
    fits.Column('E_MIN', 'E', unit='keV', array=emin), fits.Column('E_MAX', 'E', unit='keV', array=emax)], name='EBOUNDS')
hdr(eb.header, 'EBOUNDS', '1.2.0')
# Without checksums first: astropy keeps CHECKSUM cards in the header once it has written them.
fits.HDUList([fits.PrimaryHDU(), m, eb]).writeto(out + '/foreign-nosum.rmf', overwrite=True)
fits.HDUList([fits.PrimaryHDU(), m, eb]).writeto(out + '/foreign.rmf', checksum=True, overwrite=True)
a = fits.BinTableHDU.from_columns([fits.Column('ENERG_LO', 'E', unit='keV', array=lo), fits.Column('ENERG_HI', 'E', unit='keV', array=hi),
    fits.Column('SPECRESP', 'E', unit='cm**2', array=200 * (1 - np.exp(-0.5 * (lo + hi))))], name='SPECRESP')
hdr(a.header, 'SPECRESP', '1.1.0'); del a.header['CHANTYPE']; del a.header['DETCHANS']
fits.HDUList([fits.PrimaryHDU(), a]).writeto(out + '/foreign.arf', checksum=True, overwrite=True)
p = fits.BinTableHDU.from_columns([fits.Column('CHANNEL', 'J', array=np.arange(nchan, dtype=np.int32) + first),
    fits.Column('COUNTS', 'J', array=(np.arange(nchan) % 7).astype(np.int32))], name='SPECTRUM')
for k, v in [('TELESCOP', 'OTHERSAT'), ('INSTRUME', 'OTHERCAM'), ('FILTER', 'NONE'), ('EXPOSURE', 1000.0), ('AREASCAL', 1.0),
             ('BACKSCAL', 1.0), ('BACKFILE', 'none'), ('RESPFILE', 'foreign.rmf'), ('ANCRFILE', 'foreign.arf'), ('CORRFILE', 'none'),
             ('CORRSCAL', 1.0), ('HDUCLASS', 'OGIP'), ('HDUCLAS1', 'SPECTRUM'), ('HDUCLAS2', 'TOTAL'), ('HDUCLAS3', 'COUNT'),
             ('HDUVERS', '1.2.1'), ('POISSERR', True), ('CHANTYPE', 'PHA'), ('DETCHANS', nchan)]:
    p.header[k] = v
p.header['TLMIN1'] = first; p.header['TLMAX1'] = first + nchan - 1
fits.HDUList([fits.PrimaryHDU(), p]).writeto(out + '/foreign.pha', checksum=True, overwrite=True)
# Broken copy: a row whose sum exceeds 1, written by astropy with valid checksums.
mat2 = np.array(mat); mat2[10] *= 1.5
m2 = m.copy(); m2.data['MATRIX'] = mat2
fits.HDUList([fits.PrimaryHDU(), m2, eb]).writeto(out + '/foreign-rowsum.rmf', checksum=True, overwrite=True)
print(json.dumps({'ok': True, 'rowSum10': float(mat2[10].sum())}))
`;

describe.runIf(runAstropyChecks)('kiln check on files written by astropy', () => {
  let dir = '';
  let rowSum10 = 0;
  beforeAll(() => {
    dir = mkdtempSync(join(tmpdir(), 'kiln-foreign-'));
    rowSum10 = runPythonJson<{ rowSum10: number }>('astropy', WRITE_FOREIGN, { dir }).rowSum10;
  });
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  for (const f of ['foreign.rmf', 'foreign.arf', 'foreign.pha']) {
    it(`${f} passes with no failure and verified checksums`, () => {
      const r = kilnCheck('--json', join(dir, f));
      const report = JSON.parse(r.stdout);
      const bad = report.files[0].checks.filter((c: { status: string }) => c.status === 'fail' || c.status === 'warn');
      expect(bad, JSON.stringify(bad, null, 1)).toEqual([]);
      expect(r.status).toBe(0);
      const ids = report.files[0].checks.filter((c: { status: string }) => c.status === 'pass').map((c: { id: string }) => c.id);
      expect(ids).toContain('fits.checksum');
      expect(ids).toContain('fits.datasum');
    });
  }

  it('foreign.rmf: first channel 0 from TLMIN is honoured', () => {
    const r = kilnCheck('--json', join(dir, 'foreign.rmf'));
    const c = JSON.parse(r.stdout).files[0].checks.find((x: { id: string }) => x.id === 'rmf.channels.range');
    expect(c.status).toBe('pass');
    expect(c.tolerance).toBe('channels 0–127');
  });

  it('a file without checksums exits 0 but warns that integrity is not verifiable', () => {
    const r = kilnCheck('--json', join(dir, 'foreign-nosum.rmf'));
    expect(r.status).toBe(0);
    const checks = JSON.parse(r.stdout).files[0].checks;
    expect(checks.find((c: { id: string }) => c.id === 'fits.checksum').status).toBe('warn');
  });

  it('an astropy-written matrix with a row sum above 1 fails rmf.rows.sum-le-1', () => {
    expect(rowSum10).toBeGreaterThan(1); // astropy's own reading of the row it wrote
    const r = kilnCheck(join(dir, 'foreign-rowsum.rmf'));
    expect(r.status).toBe(1);
    expect(r.stdout).toMatch(/^\s*FAIL\s+rmf\.rows\.sum-le-1\s/m);
  });
});

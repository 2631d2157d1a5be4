/**
 * The row the release page draws for a chosen energy (src/lib/published-row): the bin containing
 * the energy and the row expanded over every channel. Checked against astropy (Debian's
 * python3-astropy, an independent FITS reader) on a published RMF, and on a small hand-made matrix
 * whose expected row is written out by hand from the OGIP grouping rule (OGIP memo CAL/GEN/92-002:
 * N_GRP groups, each N_CHAN channels from F_CHAN; channels numbered from TLMIN of F_CHAN).
 */
import { describe, expect, it } from 'vitest';
import { existsSync, readdirSync, readFileSync } from 'node:fs';
import { requireFreshOutput } from '../support/fresh-build.ts';
import { join, resolve } from 'node:path';
import type { RmfData } from '../../generators/response/types.ts';
import { binContaining, binRangeText, readPublishedRmf, rmfProductOf, rowAtEnergy, rowCsv } from '../../src/lib/published-row/index.ts';
import { runAstropyChecks, runPythonJson } from '../support/python.ts';

/** Three bins 1–2, 2–4, 4–8 keV; four channels numbered from 1; row 1 in two groups. */
function tiny(): RmfData {
  return {
    meta: {} as RmfData['meta'],
    hduclas3: 'REDIST',
    detchans: 4,
    firstChannel: 1,
    loThres: 0,
    energLoKeV: Float64Array.from([1, 2, 4]),
    energHiKeV: Float64Array.from([2, 4, 8]),
    rows: [
      { fChan: Int32Array.from([1]), nChan: Int32Array.from([1]), matrix: Float32Array.from([0.5]) },
      { fChan: Int32Array.from([1, 3]), nChan: Int32Array.from([1, 2]), matrix: Float32Array.from([0.25, 0.5, 0.125]) },
      { fChan: Int32Array.from([4]), nChan: Int32Array.from([1]), matrix: Float32Array.from([1]) },
    ],
    ebounds: { firstChannel: 1, eMinKeV: Float64Array.from([0, 2, 4, 6]), eMaxKeV: Float64Array.from([2, 4, 6, 8]) },
  };
}

describe('published-row on a hand-made matrix', () => {
  it('finds the bin with ENERG_LO ≤ E < ENERG_HI; the top edge belongs to the last bin', () => {
    const d = tiny();
    expect(binContaining(d, 1)).toBe(0);
    expect(binContaining(d, 1.999)).toBe(0);
    expect(binContaining(d, 2)).toBe(1);
    expect(binContaining(d, 7.5)).toBe(2);
    expect(binContaining(d, 8)).toBe(2);
    expect(binContaining(d, 0.5)).toBe(-1);
    expect(binContaining(d, 8.01)).toBe(-1);
    expect(binContaining(d, Number.NaN)).toBe(-1);
  });

  it('expands the grouped row over every channel', () => {
    const r = rowAtEnergy(tiny(), 3);
    expect(r.bin).toBe(1);
    expect([r.binLoKeV, r.binHiKeV]).toEqual([2, 4]);
    expect(r.probability).toEqual([0.25, 0, 0.5, 0.125]);
    expect(r.channelEnergyKeV).toEqual([1, 3, 5, 7]);
    expect(rowCsv(r, 'tiny').split('\n').slice(2, 4)).toEqual(['1,0.25', '3,0']);
  });

  it('names the grid range when the energy is outside it', () => {
    expect(() => rowAtEnergy(tiny(), 20)).toThrow('20 keV is outside the matrix energy grid, 1–8 keV');
  });

  it('writes bin edges with one decimal more than the bin width needs', () => {
    expect(binRangeText(3.205, 3.22)).toBe('3.205–3.220');
    expect(binRangeText(1, 2)).toBe('1.0–2.0');
  });

  it('picks the detector RMF, preferring the all-epoch one', () => {
    const p = (id: string, kind: 'rmf' | 'arf' | 'rsp', epoch: string) => ({ id, kind, detector: 'd', epoch, path: `files/${id}`, bytes: 1, sha256: '', validFrom: '', validTo: null });
    expect(rmfProductOf([p('a', 'arf', 'e1'), p('b', 'rmf', 'e1'), p('c', 'rmf', 'all')] as never, 'd')?.id).toBe('c');
    expect(rmfProductOf([p('a', 'arf', 'e1'), p('r', 'rsp', 'e2')] as never, 'd')?.id).toBe('r');
    expect(rmfProductOf([p('a', 'arf', 'e1')] as never, 'd')).toBeUndefined();
  });
});

const OUT = resolve(process.env.KILN_OUT ?? '.kiln/out');
function publishedRmf(): string | null {
  const rel = join(OUT, 'releases');
  if (!existsSync(rel)) return null;
  for (const id of readdirSync(rel)) {
    const dir = join(rel, id, 'files');
    const f = existsSync(dir) ? readdirSync(dir).find((n) => n.endsWith('.rmf.gz')) : undefined;
    if (f) return join(dir, f);
  }
  return null;
}

/** An energy between the demo profile energies, inside any X-ray CCD grid (common practice, no source). */
const PICK_KEV = 3.21;

describe.runIf(runAstropyChecks)('published-row against astropy on a published RMF', () => {
  it('the row of the bin containing the energy matches astropy', async () => {
    const file = publishedRmf();
    if (!file) throw new Error(`no *.rmf.gz under ${OUT}/releases: run npm run build first`);
    requireFreshOutput(`the build output ${OUT}`);
    const d = await readPublishedRmf(new Uint8Array(readFileSync(file)), file);
    const r = rowAtEnergy(d, PICK_KEV);
    // astropy.io.fits reads the variable-length MATRIX row and EBOUNDS; the row is expanded here
    // in python from F_CHAN/N_CHAN and TLMIN of F_CHAN (OGIP memo CAL/GEN/92-002).
    const ref = runPythonJson<{ bin: number; lo: number; hi: number; row: number[]; ch: number[] }>(
      'astropy',
      `
import sys, json, gzip, io
import numpy as np
from astropy.io import fits
a = json.load(sys.stdin)
h = fits.open(io.BytesIO(gzip.open(a['file']).read()))
m = next(x for x in h[1:] if x.name in ('MATRIX', 'SPECRESP MATRIX'))
eb = h['EBOUNDS'].data
lo, hi = m.data['ENERG_LO'], m.data['ENERG_HI']
i = int(np.nonzero((lo <= a['e']) & (a['e'] < hi))[0][0])
col = m.columns.names.index('F_CHAN') + 1
tlmin = int(m.header.get('TLMIN%d' % col, 1))
n = int(m.header['DETCHANS'])
row = np.zeros(n)
fc = np.atleast_1d(m.data['F_CHAN'][i]); nc = np.atleast_1d(m.data['N_CHAN'][i]); mx = np.atleast_1d(m.data['MATRIX'][i])
k = 0
for f, c in zip(fc, nc):
    row[int(f) - tlmin:int(f) - tlmin + int(c)] = mx[k:k + int(c)]
    k += int(c)
ch = (eb['E_MIN'].astype(float) + eb['E_MAX'].astype(float)) / 2
print(json.dumps({'bin': i, 'lo': float(lo[i]), 'hi': float(hi[i]), 'row': row.tolist(), 'ch': ch.tolist()}))
`,
      { file, e: PICK_KEV },
    );
    expect(r.bin).toBe(ref.bin);
    expect(r.binLoKeV).toBe(ref.lo);
    expect(r.binHiKeV).toBe(ref.hi);
    expect(r.probability).toEqual(ref.row);
    expect(r.channelEnergyKeV).toEqual(ref.ch);
    expect(ref.row.some((v) => v > 0)).toBe(true);
  });
});

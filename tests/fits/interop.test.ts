/**
 * Our files through the reference readers: astropy.io.fits (Debian python3-astropy) and fitsjs
 * 0.6.6 as patched in patches/fitsjs+0.6.6.patch. Also shows what unpatched fitsjs does wrong.
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { copyFileSync, mkdirSync, mkdtempSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { readFits, writeFits } from '../../generators/fits/index.ts';
import { runAstropyChecks } from '../support/python.ts';
import { astropyView } from './support/astropy.ts';
import { columnOf, loadFitsjs, openBlob, rowsOf } from './support/fitsjs.ts';
import { ALL_TYPES_HDUS } from './support/tables.ts';

const tmp = mkdtempSync(join(tmpdir(), 'kiln-interop-'));
const bytes = writeFits(ALL_TYPES_HDUS);
const path = join(tmp, 'alltypes.fits');
writeFileSync(path, bytes);
const oursFile = readFits(bytes);
const ours = oursFile.hdus[1].table!;

/** Plain JSON-like form of our values (bigint → string, as the astropy bridge gives them). */
function plain(v: unknown): unknown {
  if (typeof v === 'bigint') return v.toString();
  if (ArrayBuffer.isView(v)) return Array.from(v as unknown as ArrayLike<unknown>, plain);
  if (Array.isArray(v)) return v.map(plain);
  return v;
}

describe.runIf(runAstropyChecks)('astropy.io.fits reads the all-types table', () => {
  const view = runAstropyChecks ? astropyView(path) : null!;
  it("passes verify('exception') and checksum verification, without warnings", () => {
    expect(view.verifyError).toBeNull();
    expect(view.warnings).toEqual([]);
    for (const h of view.hdus) {
      expect([h.name, h.checksumValid, h.datasumValid]).toEqual([h.name, 1, 1]);
      // Same sums computed by astropy from the same bytes.
      expect(h.computedChecksum).toBe(h.header.CHECKSUM);
      expect(h.computedDatasum).toBe(h.header.DATASUM);
    }
  });
  it('gets the same value in every column, variable-length arrays included', () => {
    const cols = view.hdus[1].columns;
    for (const c of ours.columns) {
      const theirs = cols[c.name];
      expect(theirs, c.name).toBeDefined();
      const got = plain(ours.values.get(c.name));
      const want = c.form.type === 'A' ? (theirs.values as string[]).map((s) => s.trimEnd()) : theirs.values;
      expect(got, c.name).toEqual(want);
    }
    expect(cols.FLOAT.unit).toBe('keV');
    expect(cols.VLA_E.format).toBe('1PE(3)');
  });
});

describe('fitsjs 0.6.6 (patched) reads the same files', () => {
  const astro = loadFitsjs();
  it('returns the same values for every column, by rows and by column', async () => {
    const hdus = await openBlob(astro, bytes);
    expect(hdus).toHaveLength(2);
    const table = hdus[1].data!;
    const rows = await rowsOf(table);
    for (const c of ours.columns) {
      const mine = plain(ours.values.get(c.name)) as unknown[];
      const theirs = rows.map((r) => plain(r[c.name]));
      // fitsjs returns K as a JS number: compare as numbers (exact below 2^53).
      const want = c.form.type === 'K' ? mine.map((s) => Number(s as string)) : mine;
      expect(theirs, c.name).toEqual(want);
      const col = plain(Array.from(await columnOf(table, c.name) as ArrayLike<unknown>));
      expect(col, `${c.name} via getColumn`).toEqual(want);
    }
  });
});

/** Unpatched fitsjs, rebuilt by reversing the committed patch on a copy. */
function unpatchedFitsjs(): string {
  const req = createRequire(import.meta.url);
  const src = req.resolve('fitsjs');
  const dir = mkdtempSync(join(tmpdir(), 'fitsjs-orig-'));
  const dest = join(dir, 'node_modules', 'fitsjs', 'lib');
  mkdirSync(dest, { recursive: true });
  copyFileSync(src, join(dest, 'fits.js'));
  execFileSync('git', ['apply', '-R', join(import.meta.dirname, '..', '..', 'patches', 'fitsjs+0.6.6.patch')], { cwd: dir });
  return join(dest, 'fits.js');
}

describe('why fitsjs needs the patch (each fault shown on the unpatched code)', () => {
  const orig = unpatchedFitsjs();

  it('unpatched: require() in Node cannot create data units (bare `astro` global)', () => {
    const r = spawnSync(process.execPath, ['-e', `
      globalThis.FileReader = class { readAsArrayBuffer(b) { b.arrayBuffer().then((x) => { this.result = x; this.onloadend({ target: this }); }); } };
      const m = require(${JSON.stringify(orig)});
      new m.astro.FITS(new Blob([require('fs').readFileSync(${JSON.stringify(path)})]), () => console.log('opened'));
    `], { encoding: 'utf8' });
    expect(r.status).not.toBe(0);
    expect(r.stderr).toMatch(/ReferenceError: astro is not defined/);
  });

  it('unpatched: in Blob mode the heap is never loaded, so any P column throws', () => {
    const r = spawnSync(process.execPath, ['-e', `
      globalThis.FileReader = class { readAsArrayBuffer(b) { b.arrayBuffer().then((x) => { this.result = x; this.onloadend({ target: this }); }); } };
      const m = require(${JSON.stringify(orig)}); globalThis.astro = m.astro;
      new m.astro.FITS(new Blob([require('fs').readFileSync(${JSON.stringify(path)})]), function () {
        this.hdus[1].data.getRows(0, 3, (rows) => console.log(JSON.stringify(rows)));
      });
    `], { encoding: 'utf8' });
    expect(r.status).not.toBe(0);
    expect(r.stderr).toMatch(/TypeError: Cannot read properties of undefined \(reading 'slice'\)/);
  });

  it('unpatched: variable-length arrays are sliced by element count, not bytes (1PJ, 1PE fail)', () => {
    // Buffer mode (an ArrayBuffer data unit) does load the heap; the heap accessor is still wrong.
    const one = (tform: string, data: number[][]) => {
      const b = writeFits([{ kind: 'primary' }, { kind: 'bintable', name: 'V', columns: [{ name: 'V', tform, data }] }]);
      const f = readFits(b);
      const p = join(tmp, `vla-${tform}.fits`);
      writeFileSync(p, b);
      const r = spawnSync(process.execPath, ['-e', `
        try {
        const m = require(${JSON.stringify(orig)}); globalThis.astro = m.astro;
        const buf = require('fs').readFileSync(${JSON.stringify(p)});
        const ab = buf.buffer.slice(buf.byteOffset, buf.byteOffset + buf.length);
        const header = new m.astro.FITS.Header(String.fromCharCode(...new Uint8Array(ab.slice(${f.hdus[1].headerOffset}, ${f.hdus[1].dataOffset}))));
        const table = new m.astro.FITS.BinaryTable(header, ab.slice(${f.hdus[1].dataOffset}));
        console.log(JSON.stringify(table.getRows(0, ${data.length}).map((x) => Array.from(x.V))));
        } catch (e) { console.log(JSON.stringify(String(e))); }
      `], { encoding: 'utf8' });
      expect(r.stderr).toBe('');
      return JSON.parse(r.stdout) as unknown;
    };
    // 1PJ, first row of 1 element: a 1-byte slice cannot make a 4-byte integer array.
    expect(one('1PJ', [[1], [2, 3]])).toMatch(/RangeError: byte length of Uint32Array should be a multiple of 4/);
    // 1PE, 4 elements: 4 bytes give one float, then there is no byte swapper for E.
    expect(one('1PE', [[1, 2, 3, 4]])).toMatch(/TypeError: .*swapEndian\[descriptor\] is not a function/);
  });

  it('unpatched: K columns decode wrongly and I/J getColumn wraps negatives', () => {
    const r = spawnSync(process.execPath, ['-e', `
      const m = require(${JSON.stringify(orig)}); globalThis.astro = m.astro;
      const v = new DataView(new ArrayBuffer(8)); v.setBigInt64(0, 2n ** 40n);
      const bt = m.astro.FITS.BinaryTable.prototype;
      console.log(JSON.stringify({ k: bt.dataAccessors.K(v, 0)[0], j: new bt.typedArray.J([-5])[0] }));
    `], { encoding: 'utf8' });
    const out = JSON.parse(r.stdout) as { k: number; j: number };
    expect(out.k).not.toBe(2 ** 40);
    expect(out.j).toBe(2 ** 32 - 5);
  });
});

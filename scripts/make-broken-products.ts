/**
 * Writes the test corpus of deliberately broken OGIP products into tests/fixtures/broken/ (or the
 * directory given as the first argument): three clean products (RMF, ARF, PHA) and one file per
 * fault. Every file stays readable FITS; each carries exactly one OGIP fault. Value faults are
 * written through the OGIP writers; structural faults edit header cards of a clean file and then
 * recompute CHECKSUM so that only the OGIP fault remains (except the checksum fault itself).
 *
 *   npx tsx scripts/make-broken-products.ts [OUT_DIR]
 *
 * All data are invented (mission "KILNSAT", camera "FIXTURECAM"): smooth shapes, not a real
 * instrument. Output depends only on this script (no clock, no randomness).
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import {
  addSums,
  CARD_BYTES,
  complement,
  encodeChecksum,
  formatCard,
  onesComplementSum,
  paddedLength,
  readFits,
  type FitsFile,
} from '../generators/fits/index.ts';
import { writeArf, writePha, writeRmf } from '../generators/ogip/index.ts';
import type { ArfData, PhaData, ResponseMeta, RmfData, RmfRow } from '../generators/response/types.ts';

// ---- invented clean products -------------------------------------------------------------

const META: ResponseMeta = {
  telescop: 'KILNSAT',
  instrume: 'FIXTURECAM',
  filter: 'NONE',
  chantype: 'PI',
  date: '2026-01-01',
  history: ['Invented test fixture written by scripts/make-broken-products.ts'],
};
const DETCHANS = 256;
const FIRST_CHANNEL = 1;
const CHANNEL_WIDTH_KEV = 0.04;
const N_ENERGY = 196;
const ENERGY_START_KEV = 0.2;
const ENERGY_STEP_KEV = 0.05;
/** Invented resolution: FWHM² = READ² + FANO_TERM·E (eV², E in eV). */
const READ_FWHM_EV = 70;
const FANO_TERM_EV = 2.3548 ** 2 * 0.115 * 3.65;
/** Invented fraction of events in the Gaussian (the rest is "lost below threshold"). */
const DETECTED_FRACTION = 0.97;
/** Matrix elements below this are not stored (LO_THRES). */
const LO_THRES = 1e-7;

/** erf by Abramowitz & Stegun 7.1.26 (|error| < 1.5e-7): plenty for an invented fixture. */
function erf(x: number): number {
  const s = Math.sign(x);
  const a = Math.abs(x);
  const t = 1 / (1 + 0.3275911 * a);
  const y = 1 - ((((1.061405429 * t - 1.453152027) * t + 1.421413741) * t - 0.284496736) * t + 0.254829592) * t * Math.exp(-a * a);
  return s * y;
}

function fwhmEv(eKeV: number): number {
  return Math.sqrt(READ_FWHM_EV ** 2 + FANO_TERM_EV * eKeV * 1000);
}

export function cleanRmf(): RmfData {
  const lo = Float64Array.from({ length: N_ENERGY }, (_, i) => ENERGY_START_KEV + i * ENERGY_STEP_KEV);
  const hi = Float64Array.from({ length: N_ENERGY }, (_, i) => ENERGY_START_KEV + (i + 1) * ENERGY_STEP_KEV);
  const eMin = Float64Array.from({ length: DETCHANS }, (_, c) => c * CHANNEL_WIDTH_KEV);
  const eMax = Float64Array.from({ length: DETCHANS }, (_, c) => (c + 1) * CHANNEL_WIDTH_KEV);
  const rows: RmfRow[] = [];
  for (let i = 0; i < N_ENERGY; i++) {
    const e = 0.5 * (lo[i] + hi[i]);
    const sigma = fwhmEv(e) / 2.3548 / 1000;
    const p = Array.from({ length: DETCHANS }, (_, c) => {
      const z = (x: number) => (x - e) / (Math.SQRT2 * sigma);
      return (DETECTED_FRACTION * (erf(z(eMax[c])) - erf(z(eMin[c])))) / 2;
    });
    const first = p.findIndex((v) => v >= LO_THRES);
    let last = DETCHANS - 1;
    while (p[last] < LO_THRES) last--;
    rows.push({
      fChan: Int32Array.of(first + FIRST_CHANNEL),
      nChan: Int32Array.of(last - first + 1),
      matrix: Float32Array.from(p.slice(first, last + 1)),
    });
  }
  return {
    meta: META,
    hduclas3: 'REDIST',
    detchans: DETCHANS,
    firstChannel: FIRST_CHANNEL,
    loThres: LO_THRES,
    energLoKeV: lo,
    energHiKeV: hi,
    rows,
    ebounds: { firstChannel: FIRST_CHANNEL, eMinKeV: eMin, eMaxKeV: eMax },
  };
}

export function cleanArf(): ArfData {
  const rmf = cleanRmf();
  // Invented smooth area: rises over a soft filter edge, falls with mirror reflectivity.
  const area = rmf.energLoKeV.map((lo, i) => {
    const e = 0.5 * (lo + rmf.energHiKeV[i]);
    return 350 * (1 - Math.exp(-e / 0.6)) * Math.exp(-e / 12);
  });
  return { meta: META, energLoKeV: rmf.energLoKeV, energHiKeV: rmf.energHiKeV, specrespCm2: area };
}

export function cleanPha(): PhaData {
  return {
    meta: META,
    detchans: DETCHANS,
    firstChannel: FIRST_CHANNEL,
    channel: Int32Array.from({ length: DETCHANS }, (_, i) => FIRST_CHANNEL + i),
    counts: Float64Array.from({ length: DETCHANS }, (_, i) => Math.round(200 * Math.exp(-i / 40)) + 3),
    rate: null,
    exposureS: 5000,
    backscal: 1,
    areascal: 1,
    respfile: 'clean.rmf',
    ancrfile: 'clean.arf',
    poisserr: true,
    hduclas2: 'TOTAL',
    hduclas3: 'COUNT',
  };
}

// ---- byte-level header edits ---------------------------------------------------------------

const CHECKSUM_PLACEHOLDER = '0000000000000000';

function hduOf(file: FitsFile, name: string) {
  const h = file.hdus.find((x) => x.name.trim().toUpperCase() === name);
  if (!h) throw new Error(`fixture has no ${name} HDU`);
  return h;
}

/**
 * Rewrites the header cards of one HDU (80-character card images, END excluded) through `edit`,
 * keeping the header's block count. With `recompute`, CHECKSUM is recomputed so the HDU again sums
 * to −0 (DATASUM is left as the header says, so a deliberately wrong DATASUM stays wrong).
 */
export function editCards(bytes: Uint8Array, hduName: string, edit: (cards: string[]) => string[], recompute = true): Uint8Array {
  const file = readFits(bytes, { verifyChecksums: 'report' });
  const h = hduOf(file, hduName);
  const text = new TextDecoder('latin1').decode(bytes.subarray(h.headerOffset, h.dataOffset));
  const cards: string[] = [];
  for (let at = 0; at < text.length; at += CARD_BYTES) {
    const c = text.slice(at, at + CARD_BYTES);
    if (c.startsWith('END ') || c === 'END'.padEnd(CARD_BYTES)) break;
    cards.push(c);
  }
  let next = edit(cards);
  const build = (cs: string[]) => {
    const all = [...cs, 'END'.padEnd(CARD_BYTES)].join('');
    if (paddedLength(all.length) !== h.headerBytes) throw new Error(`edited ${hduName} header no longer fits its ${h.headerBytes} bytes`);
    const out = new Uint8Array(h.headerBytes).fill(0x20);
    for (let i = 0; i < all.length; i++) out[i] = all.charCodeAt(i);
    return out;
  };
  const paddedData = bytes.subarray(h.dataOffset, h.dataOffset + paddedLength(h.dataBytes));
  if (recompute) {
    const ck = next.findIndex((c) => c.startsWith('CHECKSUM='));
    if (ck < 0) throw new Error(`${hduName} has no CHECKSUM card`);
    next = next.slice();
    next[ck] = formatCard('CHECKSUM', CHECKSUM_PLACEHOLDER, 'HDU checksum');
    const sum = addSums(onesComplementSum(build(next)), onesComplementSum(paddedData));
    next[ck] = formatCard('CHECKSUM', encodeChecksum(complement(sum)), 'HDU checksum');
  }
  const header = build(next);
  const out = new Uint8Array(bytes.length);
  out.set(bytes.subarray(0, h.headerOffset), 0);
  out.set(header, h.headerOffset);
  out.set(bytes.subarray(h.dataOffset), h.dataOffset);
  return out;
}

const key = (c: string) => c.slice(0, 8).trimEnd();
const setCard = (keyword: string, value: string | number | boolean, comment = '') => (cards: string[]) =>
  cards.map((c) => (key(c) === keyword ? formatCard(keyword, value, comment) : c));
const dropCard = (keyword: string) => (cards: string[]) => cards.filter((c) => key(c) !== keyword);

/** Drops a whole HDU (header and data); the others keep their checksums. */
function dropHdu(bytes: Uint8Array, hduName: string): Uint8Array {
  const h = hduOf(readFits(bytes), hduName);
  const end = h.dataOffset + paddedLength(h.dataBytes);
  const out = new Uint8Array(bytes.length - (end - h.headerOffset));
  out.set(bytes.subarray(0, h.headerOffset), 0);
  out.set(bytes.subarray(end), h.headerOffset);
  return out;
}

/** Column number n of TTYPEn = name in an HDU, for TUNITn edits. */
function columnNumber(bytes: Uint8Array, hduName: string, name: string): number {
  const col = hduOf(readFits(bytes), hduName).table?.column(name);
  if (!col) throw new Error(`no column ${name} in ${hduName}`);
  return col.index;
}

// ---- the corpus ------------------------------------------------------------------------------

export interface Fixture {
  file: string;
  fault: string;
  bytes: Uint8Array;
}

function withRows(rmf: RmfData, change: (rows: RmfRow[]) => void): RmfData {
  const rows = rmf.rows.map((r) => ({ fChan: r.fChan.slice(), nChan: r.nChan.slice(), matrix: r.matrix.slice() }));
  change(rows);
  return { ...rmf, rows };
}

export function makeFixtures(): Fixture[] {
  const rmf = cleanRmf();
  const arf = cleanArf();
  const pha = cleanPha();
  const rmfBytes = writeRmf(rmf);
  const arfBytes = writeArf(arf);
  const phaBytes = writePha(pha);
  const eLoCol = columnNumber(rmfBytes, 'MATRIX', 'ENERG_LO');
  const specrespCol = columnNumber(arfBytes, 'SPECRESP', 'SPECRESP');
  const mid = Math.floor(N_ENERGY / 2);

  return [
    { file: 'clean.rmf', fault: 'none (reference)', bytes: rmfBytes },
    { file: 'clean.arf', fault: 'none (reference)', bytes: arfBytes },
    { file: 'clean.pha', fault: 'none (reference)', bytes: phaBytes },
    { file: 'missing-ebounds.rmf', fault: 'EBOUNDS extension removed', bytes: dropHdu(rmfBytes, 'EBOUNDS') },
    { file: 'wrong-hduclas2.rmf', fault: "MATRIX HDUCLAS2 = 'SPECRESP' instead of 'RSP_MATRIX'", bytes: editCards(rmfBytes, 'MATRIX', setCard('HDUCLAS2', 'SPECRESP')) },
    { file: 'no-energ-lo-unit.rmf', fault: 'TUNIT of ENERG_LO removed', bytes: editCards(rmfBytes, 'MATRIX', dropCard(`TUNIT${eLoCol}`)) },
    { file: 'wrong-energ-lo-unit.rmf', fault: "ENERG_LO unit 'eV' instead of 'keV'", bytes: editCards(rmfBytes, 'MATRIX', setCard(`TUNIT${eLoCol}`, 'eV')) },
    {
      file: 'row-sum-above-1.rmf',
      fault: `row ${mid} scaled by 1.3 (sums to ~1.26)`,
      bytes: writeRmf(withRows(rmf, (rows) => rows[mid].matrix.forEach((v, k, a) => (a[k] = v * 1.3)))),
    },
    {
      file: 'negative-element.rmf',
      fault: `one matrix element of row ${mid} set to -0.01`,
      bytes: writeRmf(withRows(rmf, (rows) => (rows[mid].matrix[0] = -0.01))),
    },
    {
      file: 'nan-specresp.arf',
      fault: `SPECRESP of bin ${mid} is NaN`,
      bytes: writeArf({ ...arf, specrespCm2: arf.specrespCm2.map((v, i) => (i === mid ? NaN : v)) }),
    },
    { file: 'wrong-specresp-unit.arf', fault: "SPECRESP unit 'cm' instead of 'cm**2'", bytes: editCards(arfBytes, 'SPECRESP', setCard(`TUNIT${specrespCol}`, 'cm')) },
    {
      file: 'grid-gap.rmf',
      fault: `ENERG_HI of bin ${mid} is 0.01 keV below ENERG_LO of bin ${mid + 1}`,
      bytes: writeRmf({ ...rmf, energHiKeV: rmf.energHiKeV.map((v, i) => (i === mid ? v - 0.01 : v)) }),
    },
    {
      file: 'f-chan-out-of-range.rmf',
      fault: `row ${mid} group starts at channel ${DETCHANS - 2} and runs past the last channel ${FIRST_CHANNEL + DETCHANS - 1}`,
      bytes: writeRmf(withRows(rmf, (rows) => (rows[mid].fChan[0] = DETCHANS - 2))),
    },
    {
      file: 'ebounds-not-monotonic.rmf',
      fault: 'E_MIN/E_MAX of channels 100 and 101 (1-based rows) swapped',
      bytes: writeRmf({
        ...rmf,
        ebounds: {
          ...rmf.ebounds,
          eMinKeV: swap(rmf.ebounds.eMinKeV, 99, 100),
          eMaxKeV: swap(rmf.ebounds.eMaxKeV, 99, 100),
        },
      }),
    },
    { file: 'detchans-mismatch.rmf', fault: `MATRIX DETCHANS = ${DETCHANS + 8} while EBOUNDS has ${DETCHANS} rows`, bytes: editCards(rmfBytes, 'MATRIX', setCard('DETCHANS', DETCHANS + 8)) },
    { file: 'bad-datasum.rmf', fault: 'MATRIX DATASUM changed to a wrong value (CHECKSUM recomputed)', bytes: editCards(rmfBytes, 'MATRIX', (cs) => cs.map((c) => (key(c) === 'DATASUM' ? formatCard('DATASUM', '12345', 'data unit checksum') : c))) },
    { file: 'no-exposure.pha', fault: 'EXPOSURE keyword removed', bytes: editCards(phaBytes, 'SPECTRUM', dropCard('EXPOSURE')) },
  ];
}

function swap(a: Float64Array, i: number, j: number): Float64Array {
  const b = a.slice();
  [b[i], b[j]] = [b[j], b[i]];
  return b;
}

function readme(fixtures: Fixture[]): string {
  return [
    '# Broken OGIP products (test corpus)',
    '',
    'Written by `npx tsx scripts/make-broken-products.ts`; do not edit by hand. Invented data',
    '(mission KILNSAT, camera FIXTURECAM). Each file is readable FITS with one OGIP fault.',
    '',
    '| file | fault |',
    '|---|---|',
    ...fixtures.map((f) => `| ${f.file} | ${f.fault} |`),
    '',
  ].join('\n');
}

function main(): void {
  const out = resolve(process.argv[2] ?? join('tests', 'fixtures', 'broken'));
  mkdirSync(out, { recursive: true });
  const fixtures = makeFixtures();
  for (const f of fixtures) writeFileSync(join(out, f.file), f.bytes);
  writeFileSync(join(out, 'README.md'), readme(fixtures));
  process.stdout.write(`wrote ${fixtures.length} files to ${out}\n`);
}

if (process.argv[1] && resolve(process.argv[1]).endsWith('make-broken-products.ts')) main();

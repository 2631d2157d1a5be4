/** Spectrum (PHA) files per OGIP/92-007: extension SPECTRUM with CHANNEL and COUNTS or RATE. */
import { KilnInputError } from '../errors.ts';
import { fitsFail, writeFits, type CardInput, type ColumnInput, type FitsFile, type FitsHeader } from '../fits/index.ts';
import type { PhaData } from '../response/types.ts';
import { OGIP_DEFAULT_FIRST_CHANNEL, OGIP_HDUCLASS, findExtension, instrumentCards, optionalColumn, primaryCards, r, readMeta, requireColumn, toFloat64, trailerCards, upper } from './common.ts';

/** HDUVERS of the SPECTRUM extension (OGIP/92-007) *(memory)*. */
export const PHA_HDUVERS = '1.2.1';
const INT32_MIN = -2147483648;
const INT32_MAX = 2147483647;

// Stryker disable all: card comments are free text for the human reader (FITS Standard 4.0 §4.1.2.3, from memory); no reader interprets them and OGIP/92-007 does not fix their wording, so a changed comment changes no meaning of the file.
const COMMENT = {
  EXPOSURE: 'exposure time (s)',
  AREASCAL: 'area scaling factor',
  BACKFILE: 'associated background file',
  BACKSCAL: 'background scaling factor',
  CORRFILE: 'associated correction file',
  CORRSCAL: 'correction scaling factor',
  RESPFILE: 'associated redistribution matrix',
  ANCRFILE: 'associated ancillary response',
  HDUCLASS: 'format conforms to OGIP standard',
  HDUCLAS1: 'PHA dataset',
  HDUCLAS2: 'TOTAL, NET or BKG',
  HDUCLAS3: 'COUNT or RATE',
  HDUVERS: 'version of the format',
  POISSERR: 'Poisson errors apply',
  CHANTYPE: 'channel type (PHA or PI)',
  DETCHANS: 'total number of detector channels',
  SYS_ERR: 'no systematic error',
  QUALITY: 'all channels good',
  GROUPING: 'no grouping',
};
// Stryker restore all

function allInt32(a: Float64Array): boolean {
  for (const v of a) if (!Number.isInteger(v) || v < INT32_MIN || v > INT32_MAX) return false;
  return true;
}

export function writePha(d: PhaData): Uint8Array {
  const n = d.channel.length;
  if (!d.counts && !d.rate) throw new KilnInputError('spectrum has neither counts nor rate', { field: 'counts', expected: 'COUNTS or RATE values' });
  for (const [name, a] of [['counts', d.counts], ['rate', d.rate]] as const) {
    if (a && a.length !== n) throw new KilnInputError(`${name} differs in length from channel`, { field: name, value: a.length, expected: `${n} values` });
  }
  const m = d.meta;
  const columns: ColumnInput[] = [
    { name: 'CHANNEL', tform: '1J', tlmin: d.firstChannel, tlmax: d.firstChannel + d.detchans - 1, data: d.channel },
  ];
  // Integer counts are stored as J (OGIP/92-007); anything else keeps full precision as D.
  if (d.counts) columns.push({ name: 'COUNTS', tform: allInt32(d.counts) ? '1J' : '1D', unit: 'count', data: d.counts });
  if (d.rate) columns.push({ name: 'RATE', tform: '1D', unit: 'count/s', data: d.rate });
  const cards: CardInput[] = [
    ...instrumentCards(m),
    { keyword: 'EXPOSURE', value: r(d.exposureS), comment: COMMENT.EXPOSURE },
    { keyword: 'AREASCAL', value: r(d.areascal), comment: COMMENT.AREASCAL },
    { keyword: 'BACKFILE', value: 'none', comment: COMMENT.BACKFILE },
    { keyword: 'BACKSCAL', value: r(d.backscal), comment: COMMENT.BACKSCAL },
    { keyword: 'CORRFILE', value: 'none', comment: COMMENT.CORRFILE },
    { keyword: 'CORRSCAL', value: r(0), comment: COMMENT.CORRSCAL },
    { keyword: 'RESPFILE', value: d.respfile, comment: COMMENT.RESPFILE },
    { keyword: 'ANCRFILE', value: d.ancrfile, comment: COMMENT.ANCRFILE },
    { keyword: 'HDUCLASS', value: OGIP_HDUCLASS, comment: COMMENT.HDUCLASS },
    { keyword: 'HDUCLAS1', value: 'SPECTRUM', comment: COMMENT.HDUCLAS1 },
    { keyword: 'HDUCLAS2', value: d.hduclas2, comment: COMMENT.HDUCLAS2 },
    { keyword: 'HDUCLAS3', value: d.hduclas3, comment: COMMENT.HDUCLAS3 },
    { keyword: 'HDUVERS', value: PHA_HDUVERS, comment: COMMENT.HDUVERS },
    { keyword: 'POISSERR', value: d.poisserr, comment: COMMENT.POISSERR },
    { keyword: 'CHANTYPE', value: m.chantype, comment: COMMENT.CHANTYPE },
    { keyword: 'DETCHANS', value: d.detchans, comment: COMMENT.DETCHANS },
    // Keyword forms of the optional columns, "none applied" (OGIP/92-007).
    { keyword: 'SYS_ERR', value: 0, comment: COMMENT.SYS_ERR },
    { keyword: 'QUALITY', value: 0, comment: COMMENT.QUALITY },
    { keyword: 'GROUPING', value: 0, comment: COMMENT.GROUPING },
    ...trailerCards(m),
  ];
  return writeFits([{ kind: 'primary', cards: primaryCards(m) }, { kind: 'bintable', name: 'SPECTRUM', columns, cards }]);
}

export function isPhaHeader(h: FitsHeader): boolean {
  return upper(h, 'HDUCLAS1') === 'SPECTRUM';
}

export function readPha(file: FitsFile): { data: PhaData; headers: { primary: FitsHeader; spectrum: FitsHeader } } {
  const hdu = findExtension(file, ['SPECTRUM'], isPhaHeader);
  if (!hdu) fitsFail({ fileName: file.fileName }, 'no SPECTRUM extension', { expected: "a BINTABLE named SPECTRUM or with HDUCLAS1 = 'SPECTRUM'" });
  const h = hdu.header;
  const channel = toFloat64(requireColumn(hdu, 'CHANNEL'), hdu, 'CHANNEL');
  const countsCol = optionalColumn(hdu, 'COUNTS');
  const rateCol = optionalColumn(hdu, 'RATE');
  if (!countsCol && !rateCol) fitsFail(h.ctx, 'missing column COUNTS or RATE', { expected: 'a COUNTS or a RATE column (OGIP/92-007)' });
  const str = (k: string) => {
    const v = h.get(k);
    return v === undefined || v === null ? '' : String(v);
  };
  const chCol = hdu.table!.column('CHANNEL')!;
  return {
    data: {
      meta: readMeta(h, file.hdus[0].header),
      detchans: h.getNumber('DETCHANS') ?? channel.length,
      firstChannel: chCol.tlmin ?? (channel.length ? channel[0] : OGIP_DEFAULT_FIRST_CHANNEL),
      channel: Int32Array.from(channel),
      counts: countsCol ? toFloat64(countsCol, hdu, 'COUNTS') : null,
      rate: rateCol ? toFloat64(rateCol, hdu, 'RATE') : null,
      exposureS: h.getNumber('EXPOSURE') ?? NaN,
      // OGIP/92-007 allows these as columns too; the keyword (or 1, its neutral value) is kept here.
      backscal: h.getNumber('BACKSCAL') ?? 1,
      areascal: h.getNumber('AREASCAL') ?? 1,
      respfile: str('RESPFILE'),
      ancrfile: str('ANCRFILE'),
      poisserr: h.get('POISSERR') === true,
      hduclas2: str('HDUCLAS2'),
      hduclas3: str('HDUCLAS3'),
    },
    headers: { primary: file.hdus[0].header, spectrum: h },
  };
}

/** Spectrum (PHA) files per OGIP/92-007: extension SPECTRUM with CHANNEL and COUNTS or RATE. */
import { KilnInputError } from '../errors.ts';
import { fitsFail, writeFits, type CardInput, type ColumnInput, type FitsFile, type FitsHeader } from '../fits/index.ts';
import type { PhaData } from '../response/types.ts';
import { OGIP_DEFAULT_FIRST_CHANNEL, OGIP_HDUCLASS, findExtension, instrumentCards, optionalColumn, primaryCards, r, readMeta, requireColumn, toFloat64, trailerCards, upper } from './common.ts';

/** HDUVERS of the SPECTRUM extension (OGIP/92-007) *(memory)*. */
export const PHA_HDUVERS = '1.2.1';
const INT32_MIN = -2147483648;
const INT32_MAX = 2147483647;

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
    { keyword: 'EXPOSURE', value: r(d.exposureS), comment: 'exposure time (s)' },
    { keyword: 'AREASCAL', value: r(d.areascal), comment: 'area scaling factor' },
    { keyword: 'BACKFILE', value: 'none', comment: 'associated background file' },
    { keyword: 'BACKSCAL', value: r(d.backscal), comment: 'background scaling factor' },
    { keyword: 'CORRFILE', value: 'none', comment: 'associated correction file' },
    { keyword: 'CORRSCAL', value: r(0), comment: 'correction scaling factor' },
    { keyword: 'RESPFILE', value: d.respfile, comment: 'associated redistribution matrix' },
    { keyword: 'ANCRFILE', value: d.ancrfile, comment: 'associated ancillary response' },
    { keyword: 'HDUCLASS', value: OGIP_HDUCLASS, comment: 'format conforms to OGIP standard' },
    { keyword: 'HDUCLAS1', value: 'SPECTRUM', comment: 'PHA dataset' },
    { keyword: 'HDUCLAS2', value: d.hduclas2, comment: 'TOTAL, NET or BKG' },
    { keyword: 'HDUCLAS3', value: d.hduclas3, comment: 'COUNT or RATE' },
    { keyword: 'HDUVERS', value: PHA_HDUVERS, comment: 'version of the format' },
    { keyword: 'POISSERR', value: d.poisserr, comment: 'Poisson errors apply' },
    { keyword: 'CHANTYPE', value: m.chantype, comment: 'channel type (PHA or PI)' },
    { keyword: 'DETCHANS', value: d.detchans, comment: 'total number of detector channels' },
    // Keyword forms of the optional columns, "none applied" (OGIP/92-007).
    { keyword: 'SYS_ERR', value: 0, comment: 'no systematic error' },
    { keyword: 'QUALITY', value: 0, comment: 'all channels good' },
    { keyword: 'GROUPING', value: 0, comment: 'no grouping' },
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

/** Ancillary response files (OGIP CAL/GEN/92-002): effective area per energy bin, extension SPECRESP. */
import { KilnInputError } from '../errors.ts';
import { fitsFail, writeFits, type FitsFile, type FitsHeader } from '../fits/index.ts';
import type { ArfData } from '../response/types.ts';
import { OGIP_HDUCLASS, findExtension, instrumentCards, primaryCards, readMeta, requireColumn, toFloat64, trailerCards, upper } from './common.ts';

/** HDUVERS of the SPECRESP extension (OGIP CAL/GEN/92-002). */
export const ARF_HDUVERS = '1.1.0';

// Stryker disable all: card comments are free text for the human reader (FITS Standard 4.0 §4.1.2.3, from memory); no reader interprets them and OGIP CAL/GEN/92-002 does not fix their wording, so a changed comment changes no meaning of the file.
const COMMENT = {
  HDUCLASS: 'format conforms to OGIP standard',
  HDUCLAS1: 'dataset relates to spectral response',
  HDUCLAS2: 'effective area',
  HDUVERS: 'version of the format',
};
// Stryker restore all

export function writeArf(d: ArfData): Uint8Array {
  const n = d.energLoKeV.length;
  if (d.energHiKeV.length !== n || d.specrespCm2.length !== n) {
    throw new KilnInputError('ARF columns differ in length', { field: 'specrespCm2', value: { energLo: n, energHi: d.energHiKeV.length, specresp: d.specrespCm2.length }, expected: 'ENERG_LO, ENERG_HI and SPECRESP of equal length' });
  }
  const m = d.meta;
  return writeFits([
    { kind: 'primary', cards: primaryCards(m) },
    {
      kind: 'bintable',
      name: 'SPECRESP',
      columns: [
        { name: 'ENERG_LO', tform: '1E', unit: 'keV', data: d.energLoKeV },
        { name: 'ENERG_HI', tform: '1E', unit: 'keV', data: d.energHiKeV },
        { name: 'SPECRESP', tform: '1E', unit: 'cm**2', data: d.specrespCm2 },
      ],
      cards: [
        ...instrumentCards(m),
        { keyword: 'HDUCLASS', value: OGIP_HDUCLASS, comment: COMMENT.HDUCLASS },
        { keyword: 'HDUCLAS1', value: 'RESPONSE', comment: COMMENT.HDUCLAS1 },
        { keyword: 'HDUCLAS2', value: 'SPECRESP', comment: COMMENT.HDUCLAS2 },
        { keyword: 'HDUVERS', value: ARF_HDUVERS, comment: COMMENT.HDUVERS },
        ...trailerCards(m),
      ],
    },
  ]);
}

export function isArfHeader(h: FitsHeader): boolean {
  return upper(h, 'HDUCLAS1') === 'RESPONSE' && upper(h, 'HDUCLAS2') === 'SPECRESP';
}

export function readArf(file: FitsFile): { data: ArfData; headers: { primary: FitsHeader; specresp: FitsHeader } } {
  const hdu = findExtension(file, ['SPECRESP'], isArfHeader);
  if (!hdu) fitsFail({ fileName: file.fileName }, 'no SPECRESP extension', { expected: "a BINTABLE named SPECRESP or with HDUCLAS2 = 'SPECRESP'" });
  const primary = file.hdus[0].header;
  return {
    data: {
      meta: readMeta(hdu.header, primary),
      energLoKeV: toFloat64(requireColumn(hdu, 'ENERG_LO'), hdu, 'ENERG_LO'),
      energHiKeV: toFloat64(requireColumn(hdu, 'ENERG_HI'), hdu, 'ENERG_HI'),
      specrespCm2: toFloat64(requireColumn(hdu, 'SPECRESP'), hdu, 'SPECRESP'),
    },
    headers: { primary, specresp: hdu.header },
  };
}

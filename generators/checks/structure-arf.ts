/**
 * OGIP structure of an ancillary response file, from memory of OGIP CAL/GEN/92-002 and 92-002a:
 * extension SPECRESP with columns ENERG_LO, ENERG_HI (keV), SPECRESP (cm**2); keywords
 * HDUCLASS='OGIP', HDUCLAS1='RESPONSE', HDUCLAS2='SPECRESP', HDUVERS='1.1.0', TELESCOP,
 * INSTRUME, FILTER.
 */
import { columnUnits, requiredColumns } from './columns.ts';
import { extensionPresent } from './find-hdu.ts';
import { keywordOneOf, keywordPresent, keywordVersion, type KeywordTarget } from './keywords.ts';
import type { Check, FileView } from './types.ts';

export const ARF_COLUMNS = ['ENERG_LO', 'ENERG_HI', 'SPECRESP'] as const;
const ARF_HDUVERS = ['1.1.0'];
/** 1.0.0 was the first revision; later minor revisions are read the same way. */
const ARF_HDUVERS_TOLERATED = /^1\.\d+\.\d+$/;

export function checkArfStructure(view: FileView, product: string | null): Check[] {
  const { hdu, check } = extensionPresent(view, 'arf.ext.specresp', 'SPECRESP extension present', ['SPECRESP'], product);
  const out: Check[] = [check];
  if (!hdu) return out;
  const t: KeywordTarget = { idPrefix: 'arf.specresp', hdu, product };
  out.push(requiredColumns('arf.specresp', hdu, ARF_COLUMNS, product));
  out.push(
    ...columnUnits('arf.specresp', hdu, [
      { column: 'ENERG_LO', unit: 'keV' },
      { column: 'ENERG_HI', unit: 'keV' },
      { column: 'SPECRESP', unit: 'cm**2' },
    ], product),
  );
  out.push(
    keywordOneOf(t, 'HDUCLASS', ['OGIP']),
    keywordOneOf(t, 'HDUCLAS1', ['RESPONSE']),
    keywordOneOf(t, 'HDUCLAS2', ['SPECRESP']),
    keywordVersion(t, 'HDUVERS', ARF_HDUVERS, ARF_HDUVERS_TOLERATED),
    keywordPresent(t, 'TELESCOP'),
    keywordPresent(t, 'INSTRUME'),
    keywordPresent(t, 'FILTER'),
  );
  return out;
}

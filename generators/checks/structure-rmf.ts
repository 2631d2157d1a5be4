/**
 * OGIP structure of a redistribution matrix file. Requirements written from memory of OGIP
 * CAL/GEN/92-002 ("The Calibration Requirements for Spectral Analysis") and its addendum 92-002a:
 *  - extension MATRIX (or SPECRESP MATRIX when the effective area is folded in) with columns
 *    ENERG_LO, ENERG_HI (keV), N_GRP, F_CHAN, N_CHAN, MATRIX; keywords HDUCLASS='OGIP',
 *    HDUCLAS1='RESPONSE', HDUCLAS2='RSP_MATRIX', HDUVERS='1.3.0' (older 1.1.0/1.2.0 still seen),
 *    HDUCLAS3 in REDIST | DETECTOR | FULL, TELESCOP, INSTRUME, FILTER, CHANTYPE PI | PHA, DETCHANS,
 *    LO_THRES, and TLMIN on F_CHAN giving the first channel (1 assumed when absent);
 *  - extension EBOUNDS with columns CHANNEL, E_MIN, E_MAX (keV); HDUCLAS2='EBOUNDS',
 *    HDUVERS='1.2.0', CHANTYPE and DETCHANS matching the matrix.
 */
import { columnUnits, findColumn, requiredColumns } from './columns.ts';
import { extensionPresent } from './find-hdu.ts';
import { keywordNumber, keywordOneOf, keywordPresent, keywordVersion, type KeywordTarget } from './keywords.ts';
import { makeCheck } from './make-check.ts';
import type { Check, FileView } from './types.ts';

export const RMF_MATRIX_EXTNAMES = ['MATRIX', 'SPECRESP MATRIX'] as const;
export const RMF_MATRIX_COLUMNS = ['ENERG_LO', 'ENERG_HI', 'N_GRP', 'F_CHAN', 'N_CHAN', 'MATRIX'] as const;
export const EBOUNDS_COLUMNS = ['CHANNEL', 'E_MIN', 'E_MAX'] as const;
const HDUCLAS3_VALUES = ['REDIST', 'DETECTOR', 'FULL'] as const;
const CHANTYPE_VALUES = ['PI', 'PHA'] as const;
/** 92-002a revisions of the matrix layout: 1.3.0 current; 1.0.0–1.2.x older but readable. */
const RMF_HDUVERS = ['1.3.0'];
const RMF_HDUVERS_TOLERATED = /^1\.[0-3]\.\d+$/;
const EBOUNDS_HDUVERS = ['1.2.0'];
const EBOUNDS_HDUVERS_TOLERATED = /^1\.[0-3]\.\d+$/;

const isPositiveInteger = (x: number) => Number.isInteger(x) && x > 0;

export function checkRmfStructure(view: FileView, product: string | null): Check[] {
  const m = extensionPresent(view, 'rmf.ext.matrix', 'matrix extension present', RMF_MATRIX_EXTNAMES, product);
  const e = extensionPresent(view, 'rmf.ext.ebounds', 'EBOUNDS extension present', ['EBOUNDS'], product);
  const matrix = m.hdu;
  const ebounds = e.hdu;
  const out: Check[] = [m.check, e.check];

  if (matrix) {
    const t: KeywordTarget = { idPrefix: 'rmf.matrix', hdu: matrix, product };
    out.push(requiredColumns('rmf.matrix', matrix, RMF_MATRIX_COLUMNS, product));
    out.push(
      ...columnUnits('rmf.matrix', matrix, [
        { column: 'ENERG_LO', unit: 'keV' },
        { column: 'ENERG_HI', unit: 'keV' },
      ], product),
    );
    out.push(
      keywordOneOf(t, 'HDUCLASS', ['OGIP']),
      keywordOneOf(t, 'HDUCLAS1', ['RESPONSE']),
      keywordOneOf(t, 'HDUCLAS2', ['RSP_MATRIX']),
      keywordVersion(t, 'HDUVERS', RMF_HDUVERS, RMF_HDUVERS_TOLERATED),
      // 92-002a makes HDUCLAS3 recommended rather than mandatory: missing is a warning.
      keywordOneOf(t, 'HDUCLAS3', HDUCLAS3_VALUES, 'warn'),
      keywordPresent(t, 'TELESCOP'),
      keywordPresent(t, 'INSTRUME'),
      keywordPresent(t, 'FILTER'),
      keywordOneOf(t, 'CHANTYPE', CHANTYPE_VALUES),
      keywordNumber(t, 'DETCHANS', isPositiveInteger, 'positive integer'),
      keywordNumber(t, 'LO_THRES', (x) => x >= 0, 'number ≥ 0', null, 'warn'),
    );
    out.push(checkFChanTlmin(matrix, product));
  }

  if (ebounds) {
    const t: KeywordTarget = { idPrefix: 'rmf.ebounds', hdu: ebounds, product };
    out.push(requiredColumns('rmf.ebounds', ebounds, EBOUNDS_COLUMNS, product));
    out.push(
      ...columnUnits('rmf.ebounds', ebounds, [
        { column: 'E_MIN', unit: 'keV' },
        { column: 'E_MAX', unit: 'keV' },
      ], product),
    );
    out.push(
      keywordOneOf(t, 'HDUCLASS', ['OGIP']),
      keywordOneOf(t, 'HDUCLAS1', ['RESPONSE']),
      keywordOneOf(t, 'HDUCLAS2', ['EBOUNDS']),
      keywordVersion(t, 'HDUVERS', EBOUNDS_HDUVERS, EBOUNDS_HDUVERS_TOLERATED, 'warn'),
      keywordOneOf(t, 'CHANTYPE', CHANTYPE_VALUES),
      keywordNumber(t, 'DETCHANS', isPositiveInteger, 'positive integer'),
    );
  }

  if (matrix && ebounds) out.push(...checkDetchansAgreement(matrix, ebounds, product));
  return out;
}

/** TLMIN of F_CHAN names the first channel; 92-002a: when absent, readers assume 1 (warn). */
function checkFChanTlmin(matrix: FileView['hdus'][number], product: string | null): Check {
  const col = findColumn(matrix, 'F_CHAN');
  const base = { id: 'rmf.matrix.tlmin-f_chan', title: 'TLMIN of F_CHAN (first channel)', product, tolerance: 'integer, usually 0 or 1' };
  if (!col) return makeCheck('fail', { ...base, message: 'no F_CHAN column, first channel unknown' });
  if (col.tlmin === undefined) {
    return makeCheck('warn', { ...base, message: 'F_CHAN has no TLMIN; readers will assume the first channel is 1' });
  }
  const ok = Number.isInteger(col.tlmin) && col.tlmin >= 0;
  return makeCheck(ok ? 'pass' : 'fail', {
    ...base,
    measured: col.tlmin,
    message: ok ? `first channel ${col.tlmin}` : `TLMIN of F_CHAN = ${col.tlmin}; expected a non-negative integer`,
  });
}

/** DETCHANS of MATRIX and EBOUNDS agree, and EBOUNDS has exactly DETCHANS rows; CHANTYPE agrees. */
function checkDetchansAgreement(matrix: FileView['hdus'][number], ebounds: FileView['hdus'][number], product: string | null): Check[] {
  const dm = matrix.header.get('DETCHANS');
  const de = ebounds.header.get('DETCHANS');
  const rows = ebounds.rows;
  const ok = typeof dm === 'number' && dm === de && dm === rows;
  const ctM = matrix.header.get('CHANTYPE');
  const ctE = ebounds.header.get('CHANTYPE');
  const ctOk = ctM !== undefined && ctM === ctE;
  return [
    makeCheck(ok ? 'pass' : 'fail', {
      id: 'rmf.detchans.agree',
      title: 'DETCHANS agrees between MATRIX, EBOUNDS and EBOUNDS rows',
      product,
      measured: `MATRIX ${String(dm)}, EBOUNDS ${String(de)}, EBOUNDS rows ${rows}`,
      tolerance: 'all equal',
      message: ok ? `${dm} channels everywhere` : `channel counts disagree: MATRIX DETCHANS=${String(dm)}, EBOUNDS DETCHANS=${String(de)}, EBOUNDS has ${rows} rows`,
    }),
    makeCheck(ctOk ? 'pass' : 'fail', {
      id: 'rmf.chantype.agree',
      title: 'CHANTYPE agrees between MATRIX and EBOUNDS',
      product,
      measured: `MATRIX ${String(ctM)}, EBOUNDS ${String(ctE)}`,
      tolerance: 'equal',
      message: ctOk ? `CHANTYPE ${String(ctM)}` : `CHANTYPE differs: MATRIX ${String(ctM)}, EBOUNDS ${String(ctE)}`,
    }),
  ];
}

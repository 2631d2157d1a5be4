/**
 * OGIP structure of a spectrum (PHA) file, from memory of OGIP/92-007 ("The OGIP Spectral File
 * Format") and its addendum 92-007a: extension SPECTRUM with column CHANNEL and COUNTS or RATE;
 * keywords HDUCLASS='OGIP', HDUCLAS1='SPECTRUM', HDUVERS (1.2.1 current; 1.1.0, 1.2.0 older),
 * HDUCLAS2 TOTAL | NET | BKG, HDUCLAS3 COUNT | RATE (matching the data column), TELESCOP,
 * INSTRUME, FILTER, EXPOSURE (s), BACKSCAL and AREASCAL (keyword or column), RESPFILE, ANCRFILE
 * ('none' allowed), POISSERR (when F, a STAT_ERR column is required), CHANTYPE, DETCHANS.
 */
import { findColumn, requiredColumns } from './columns.ts';
import { extensionPresent } from './find-hdu.ts';
import { keywordNumber, keywordOneOf, keywordPresent, keywordVersion, type KeywordTarget } from './keywords.ts';
import { makeCheck } from './make-check.ts';
import type { Check, FileView, HduView } from './types.ts';

const PHA_HDUVERS = ['1.2.1'];
const PHA_HDUVERS_TOLERATED = /^1\.[0-2]\.\d+$/;

export function checkPhaStructure(view: FileView, product: string | null): Check[] {
  const { hdu, check } = extensionPresent(view, 'pha.ext.spectrum', 'SPECTRUM extension present', ['SPECTRUM'], product);
  const out: Check[] = [check];
  if (!hdu) return out;
  const t: KeywordTarget = { idPrefix: 'pha.spectrum', hdu, product };
  const hasCounts = !!findColumn(hdu, 'COUNTS');
  const hasRate = !!findColumn(hdu, 'RATE');
  out.push(requiredColumns('pha.spectrum', hdu, ['CHANNEL'], product));
  out.push(
    makeCheck(hasCounts || hasRate ? 'pass' : 'fail', {
      id: 'pha.spectrum.data-column',
      title: 'COUNTS or RATE column present',
      product,
      measured: hasCounts ? 'COUNTS' : hasRate ? 'RATE' : null,
      tolerance: 'COUNTS | RATE',
      message: hasCounts || hasRate ? `data in ${hasCounts ? 'COUNTS' : 'RATE'}` : 'SPECTRUM has neither COUNTS nor RATE',
    }),
  );
  out.push(
    keywordOneOf(t, 'HDUCLASS', ['OGIP']),
    keywordOneOf(t, 'HDUCLAS1', ['SPECTRUM']),
    keywordVersion(t, 'HDUVERS', PHA_HDUVERS, PHA_HDUVERS_TOLERATED),
    keywordOneOf(t, 'HDUCLAS2', ['TOTAL', 'NET', 'BKG'], 'warn'),
    keywordOneOf(t, 'HDUCLAS3', hasRate && !hasCounts ? ['RATE'] : ['COUNT'], 'warn'),
    keywordPresent(t, 'TELESCOP'),
    keywordPresent(t, 'INSTRUME'),
    keywordPresent(t, 'FILTER'),
    keywordNumber(t, 'EXPOSURE', (x) => x > 0, 'number > 0', 's'),
    scaleKeywordOrColumn(t, 'BACKSCAL'),
    scaleKeywordOrColumn(t, 'AREASCAL'),
    keywordPresentAllowNone(t, 'RESPFILE'),
    keywordPresentAllowNone(t, 'ANCRFILE'),
    checkPoisserr(hdu, product),
    keywordOneOf(t, 'CHANTYPE', ['PI', 'PHA']),
    keywordNumber(t, 'DETCHANS', (x) => Number.isInteger(x) && x > 0, 'positive integer'),
  );
  return out;
}

/** BACKSCAL/AREASCAL may be a keyword or, per channel, a column (92-007). */
function scaleKeywordOrColumn(t: KeywordTarget, name: string): Check {
  if (!t.hdu.header.has(name) && findColumn(t.hdu, name)) {
    return makeCheck('pass', {
      id: `${t.idPrefix}.keyword.${name.toLowerCase()}`,
      title: `${name} value`,
      product: t.product,
      measured: 'column',
      tolerance: 'number ≥ 0 (keyword or column)',
      message: `${name} given per channel as a column`,
    });
  }
  return keywordNumber(t, name, (x) => x >= 0, 'number ≥ 0 (keyword or column)');
}

/** RESPFILE/ANCRFILE must be present; the value 'none' (or empty) is allowed by 92-007. */
function keywordPresentAllowNone(t: KeywordTarget, name: string): Check {
  const c = keywordPresent(t, name);
  if (c.status === 'fail' && t.hdu.header.has(name)) {
    return { ...c, status: 'pass', message: `${name} present and empty (no file)` };
  }
  return c;
}

function checkPoisserr(hdu: HduView, product: string | null): Check {
  const v = hdu.header.get('POISSERR');
  const base = { id: 'pha.spectrum.keyword.poisserr', title: 'POISSERR and statistical errors', product, tolerance: 'T, or F with a STAT_ERR column' };
  if (v === undefined) {
    const ok = !!findColumn(hdu, 'STAT_ERR');
    return makeCheck(ok ? 'warn' : 'fail', {
      ...base,
      message: ok ? 'POISSERR missing but a STAT_ERR column is present' : 'POISSERR is missing and there is no STAT_ERR column',
    });
  }
  if (typeof v !== 'boolean') return makeCheck('fail', { ...base, measured: String(v), message: `POISSERR = ${String(v)}; expected a logical T or F` });
  if (v) return makeCheck('pass', { ...base, measured: 'T', message: 'Poisson errors' });
  const ok = !!findColumn(hdu, 'STAT_ERR');
  return makeCheck(ok ? 'pass' : 'fail', { ...base, measured: 'F', message: ok ? 'errors in STAT_ERR' : 'POISSERR = F but there is no STAT_ERR column' });
}

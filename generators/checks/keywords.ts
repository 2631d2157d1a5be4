/**
 * Keyword checks shared by the structural modules: presence, allowed values, version strings.
 * Ids are "<kind>.<ext>.keyword.<keyword in lower case>", e.g. "rmf.matrix.keyword.hduclas2".
 */
import { makeCheck } from './make-check.ts';
import type { Check, CheckStatus, HduView } from './types.ts';

export interface KeywordTarget {
  /** e.g. "rmf.matrix" */
  idPrefix: string;
  hdu: HduView;
  product: string | null;
}

function idOf(t: KeywordTarget, keyword: string): string {
  return `${t.idPrefix}.keyword.${keyword.toLowerCase()}`;
}

function where(t: KeywordTarget): string {
  return `extension ${t.hdu.name || '#' + t.hdu.index} (HDU ${t.hdu.index})`;
}

function show(v: unknown): string {
  return typeof v === 'string' ? `'${v}'` : String(v);
}

/** The keyword must be present with a non-empty value (any type). */
export function keywordPresent(t: KeywordTarget, keyword: string, missingStatus: CheckStatus = 'fail'): Check {
  const v = t.hdu.header.get(keyword);
  const ok = v !== undefined && !(typeof v === 'string' && v.trim() === '');
  return makeCheck(ok ? 'pass' : missingStatus, {
    id: idOf(t, keyword),
    title: `${keyword} present in ${t.hdu.name || 'HDU ' + t.hdu.index}`,
    product: t.product,
    measured: v === undefined ? null : typeof v === 'boolean' ? String(v) : v,
    tolerance: 'present, non-empty',
    message: ok ? `${keyword} = ${show(v)}` : `${keyword} is missing or empty in ${where(t)}`,
  });
}

/** The keyword must be one of `allowed` (strings compared case-sensitively after trimming). */
export function keywordOneOf(
  t: KeywordTarget,
  keyword: string,
  allowed: readonly string[],
  missingStatus: CheckStatus = 'fail',
): Check {
  const v = t.hdu.header.get(keyword);
  const s = typeof v === 'string' ? v.trim() : v;
  const tolerance = allowed.join(' | ');
  const base = { id: idOf(t, keyword), title: `${keyword} value`, product: t.product, tolerance };
  if (v === undefined) {
    return makeCheck(missingStatus, { ...base, message: `${keyword} is missing in ${where(t)} (expected ${tolerance})` });
  }
  const ok = typeof s === 'string' && allowed.includes(s);
  return makeCheck(ok ? 'pass' : 'fail', {
    ...base,
    measured: typeof s === 'boolean' ? String(s) : (s as string | number),
    message: ok ? `${keyword} = ${show(s)}` : `${keyword} = ${show(s)} in ${where(t)}; expected ${tolerance}`,
  });
}

/**
 * A version keyword (HDUVERS): `exact` passes, any value matching one of `tolerated` warns (older
 * but still readable revisions of the layout), anything else fails.
 */
export function keywordVersion(
  t: KeywordTarget,
  keyword: string,
  exact: readonly string[],
  tolerated: RegExp | null,
  missingStatus: CheckStatus = 'fail',
): Check {
  const v = t.hdu.header.get(keyword);
  const s = typeof v === 'string' ? v.trim() : v === undefined ? undefined : String(v);
  const base = { id: idOf(t, keyword), title: `${keyword} layout version`, product: t.product, tolerance: exact.join(' | ') };
  if (s === undefined) return makeCheck(missingStatus, { ...base, message: `${keyword} is missing in ${where(t)} (expected ${exact.join(' or ')})` });
  if (exact.includes(s)) return makeCheck('pass', { ...base, measured: s, message: `${keyword} = '${s}'` });
  if (tolerated && tolerated.test(s)) {
    return makeCheck('warn', { ...base, measured: s, message: `${keyword} = '${s}' is a different revision of the layout than ${exact.join(' or ')}; most readers accept it` });
  }
  return makeCheck('fail', { ...base, measured: s, message: `${keyword} = '${s}' in ${where(t)}; expected ${exact.join(' or ')}` });
}

/** The keyword must be a number satisfying `test` (e.g. a positive integer). */
export function keywordNumber(
  t: KeywordTarget,
  keyword: string,
  test: (x: number) => boolean,
  expected: string,
  unit: string | null = null,
  missingStatus: CheckStatus = 'fail',
): Check {
  const v = t.hdu.header.get(keyword);
  const base = { id: idOf(t, keyword), title: `${keyword} value`, product: t.product, tolerance: expected, unit };
  if (v === undefined) return makeCheck(missingStatus, { ...base, message: `${keyword} is missing in ${where(t)} (expected ${expected})` });
  const ok = typeof v === 'number' && Number.isFinite(v) && test(v);
  return makeCheck(ok ? 'pass' : 'fail', {
    ...base,
    measured: typeof v === 'boolean' ? String(v) : v,
    message: ok ? `${keyword} = ${v}` : `${keyword} = ${show(v)} in ${where(t)}; expected ${expected}`,
  });
}

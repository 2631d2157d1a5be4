/** Column presence and unit checks shared by the structural modules. */
import { makeCheck } from './make-check.ts';
import type { Check, ColumnView, HduView } from './types.ts';

export function findColumn(hdu: HduView, name: string): ColumnView | undefined {
  const n = name.toUpperCase();
  return hdu.columns.find((c) => c.name.trim().toUpperCase() === n);
}

/** One check: every column in `names` exists. Id "<prefix>.columns". */
export function requiredColumns(idPrefix: string, hdu: HduView, names: readonly string[], product: string | null): Check {
  const missing = names.filter((n) => !findColumn(hdu, n));
  return makeCheck(missing.length ? 'fail' : 'pass', {
    id: `${idPrefix}.columns`,
    title: `required columns of ${hdu.name}`,
    product,
    measured: missing.length ? `missing ${missing.join(', ')}` : names.join(', '),
    tolerance: names.join(', '),
    message: missing.length
      ? `extension ${hdu.name} (HDU ${hdu.index}) lacks column(s) ${missing.join(', ')}`
      : `all of ${names.join(', ')} present`,
  });
}

/** FITS 4.0 §4.3 allows several spellings of a power; these are the same unit. */
function normaliseUnit(u: string): string {
  return u.trim().replace(/\*\*|\^/g, '').replace(/\s+/g, '').toLowerCase();
}

/**
 * One check per column: TUNIT equals `unit` (spelling variants of FITS 4.0 §4.3 accepted: cm**2,
 * cm^2, cm2). A missing column is reported by requiredColumns, not here. Id
 * "<prefix>.unit.<column lower case>".
 */
export function columnUnits(
  idPrefix: string,
  hdu: HduView,
  specs: readonly { column: string; unit: string }[],
  product: string | null,
): Check[] {
  const out: Check[] = [];
  for (const { column, unit } of specs) {
    const col = findColumn(hdu, column);
    if (!col) continue;
    const ok = col.unit !== undefined && normaliseUnit(col.unit) === normaliseUnit(unit);
    out.push(
      makeCheck(ok ? 'pass' : 'fail', {
        id: `${idPrefix}.unit.${column.toLowerCase()}`,
        title: `unit of ${column}`,
        product,
        measured: col.unit ?? null,
        tolerance: unit,
        message: ok
          ? `${column} in ${col.unit}`
          : col.unit === undefined
            ? `column ${column} of ${hdu.name} has no TUNIT; expected '${unit}'`
            : `column ${column} of ${hdu.name} has unit '${col.unit}'; expected '${unit}'`,
      }),
    );
  }
  return out;
}

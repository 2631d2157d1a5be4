/** Locating extensions by EXTNAME (case-insensitive, blanks trimmed: FITS 4.0 §4.4.2.6). */
import { makeCheck } from './make-check.ts';
import type { Check, FileView, HduView } from './types.ts';

export function findHdu(hdus: readonly HduView[], ...names: string[]): HduView | undefined {
  const want = names.map((n) => n.toUpperCase());
  return hdus.find((h) => h.index > 0 && want.includes(h.name.trim().toUpperCase()));
}

/** The extension named `names` (any of them) and the check that it is present. */
export function extensionPresent(
  view: FileView,
  id: string,
  title: string,
  names: readonly string[],
  product: string | null,
): { hdu: HduView | undefined; check: Check } {
  const hdu = findHdu(view.hdus, ...names);
  const check = makeCheck(hdu ? 'pass' : 'fail', {
    id,
    title,
    product,
    measured: hdu ? hdu.name : null,
    tolerance: names.join(' | '),
    message: hdu ? `found ${hdu.name} (HDU ${hdu.index})` : `${view.fileName} has no ${names.join(' or ')} extension`,
  });
  return { hdu, check };
}

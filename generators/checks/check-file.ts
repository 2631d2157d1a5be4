/**
 * All per-product checks of one file, from its bytes: what `kiln check` runs and what the build
 * runs on every product it writes. Bytes that are not FITS throw (a FitsFormatError, i.e. a
 * KilnInputError naming the file); a readable FITS file that is OGIP-wrong gives failed checks.
 */
import { isInputError } from '../errors.ts';
import { readFits, type FitsFile } from '../fits/index.ts';
import { readArf, readPha, readRmf } from '../ogip/index.ts';
import type { RmfData } from '../response/types.ts';
import { checkArfMatchesRmf, checkArfNumbers } from './numbers-arf.ts';
import { checkChecksums } from './checksum.ts';
import { classifyFile } from './classify.ts';
import { fileView } from './fits-view.ts';
import { makeCheck } from './make-check.ts';
import { checkPhaNumbers } from './numbers-pha.ts';
import { checkRmfNumbers } from './numbers-rmf.ts';
import { checkArfStructure } from './structure-arf.ts';
import { checkPhaStructure } from './structure-pha.ts';
import { checkRmfStructure } from './structure-rmf.ts';
import type { Check, CheckedKind } from './types.ts';

export interface FileCheckResult {
  fileName: string;
  kind: CheckedKind;
  checks: Check[];
}

export interface CheckFileOptions {
  /** Product id written into each Check (default: the file name). */
  product?: string | null;
  /** The RMF an ARF is meant for: adds "arf.grid.matches-rmf". */
  rmf?: RmfData;
}

function readFailure(kind: string, product: string | null, fileName: string, reason: string): Check {
  return makeCheck('fail', {
    id: `${kind}.read`,
    title: `${kind.toUpperCase()} tables readable`,
    product,
    message: `${fileName}: cannot take the ${kind.toUpperCase()} apart for numeric checks: ${reason}`,
  });
}

/**
 * Runs the OGIP reader (lenient about values, strict about layout) and then `run` on its result;
 * a layout the reader cannot take apart becomes one failed "<kind>.read" check.
 */
function withRead<T>(kind: string, product: string | null, fileName: string, read: () => T, run: (d: T) => Check[]): Check[] {
  let data: T;
  try {
    data = read();
  } catch (e) {
    if (!isInputError(e)) throw e;
    return [readFailure(kind, product, fileName, e.oneLine())];
  }
  return run(data);
}

/** CHANNEL column of EBOUNDS as stored (the in-memory Ebounds keeps only the first channel). */
function eboundsChannels(file: FitsFile): ArrayLike<number> | undefined {
  const h = file.hdus.find((x) => x.index > 0 && x.name.trim().toUpperCase() === 'EBOUNDS');
  const col = h?.table?.column('CHANNEL');
  const v = col ? h!.table!.values.get(col.name) : undefined;
  if (!v || typeof v[0] !== 'number') return undefined;
  return v as ArrayLike<number>;
}

/** Rows are probabilities unless the effective area is folded in (SPECRESP MATRIX or HDUCLAS3 FULL, 92-002a). */
function rowsAreProbabilities(file: FitsFile, d: RmfData): boolean {
  return d.hduclas3 !== 'FULL' && !file.hdus.some((h) => h.name.trim().toUpperCase() === 'SPECRESP MATRIX');
}

export function checkFile(bytes: Uint8Array, fileName: string, opts: CheckFileOptions = {}): FileCheckResult {
  const product = opts.product === undefined ? fileName : opts.product;
  const file = readFits(bytes, { fileName, verifyChecksums: 'report' });
  const view = fileView(file, fileName);
  const kind = classifyFile(file, fileName);
  const checks: Check[] = [];
  switch (kind) {
    case 'rmf':
      checks.push(...checkRmfStructure(view, product));
      checks.push(
        ...withRead('rmf', product, fileName, () => readRmf(file).data, (d) =>
          checkRmfNumbers(d, product, { eboundsChannels: eboundsChannels(file), rowsAreProbabilities: rowsAreProbabilities(file, d) }),
        ),
      );
      break;
    case 'arf':
      checks.push(...checkArfStructure(view, product));
      checks.push(
        ...withRead('arf', product, fileName, () => readArf(file).data, (d) => [
          ...checkArfNumbers(d, product),
          ...(opts.rmf ? [checkArfMatchesRmf(d, opts.rmf, product)] : []),
        ]),
      );
      break;
    case 'pha':
      checks.push(...checkPhaStructure(view, product));
      checks.push(...withRead('pha', product, fileName, () => readPha(file).data, (d) => checkPhaNumbers(d, product)));
      break;
    default:
      checks.push(
        makeCheck('fail', {
          id: 'file.kind',
          title: 'file is an OGIP RMF, ARF or PHA',
          product,
          measured: view.hdus.map((h) => h.name || `#${h.index}`).join(', '),
          tolerance: 'MATRIX+EBOUNDS | SPECRESP | SPECTRUM',
          message: `${fileName} has none of the MATRIX, SPECRESP MATRIX, EBOUNDS, SPECRESP or SPECTRUM extensions`,
        }),
      );
  }
  checks.push(...checkChecksums(view.hdus, product));
  return { fileName, kind, checks };
}

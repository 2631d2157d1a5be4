/**
 * A local file through the project's own reader and the same per-file checks as `kiln check`
 * (generators/checks checkFile). Runs in the browser: bytes in, structures out, nothing sent.
 */
import { checkFile } from '../../../generators/checks/index.ts';
import { isInputError } from '../../../generators/errors.ts';
import { readFits } from '../../../generators/fits/index.ts';
import { identifyProduct, readArf, readRmf } from '../../../generators/ogip/index.ts';
import type { ArfData, RmfData } from '../../../generators/response/types.ts';
import type { Check } from '../../../generators/site-data/types.ts';

export interface Analysis {
  fileName: string;
  byteLength: number;
  kind: string;
  hdus: { index: number; name: string; rows: number }[];
  checks: Check[];
  arf: ArfData | null;
  rmf: RmfData | null;
  /** Set when the bytes are not readable FITS (the message names file and place). */
  error: string | null;
}

const errText = (e: unknown) => (isInputError(e) ? e.oneLine() : (e as Error).message);

export function analyseBytes(bytes: Uint8Array, fileName: string): Analysis {
  const a: Analysis = { fileName, byteLength: bytes.length, kind: 'unknown', hdus: [], checks: [], arf: null, rmf: null, error: null };
  try {
    const file = readFits(bytes, { fileName, verifyChecksums: 'report' });
    a.hdus = file.hdus.map((h) => ({ index: h.index, name: h.name, rows: h.table?.nRows ?? 0 }));
    a.kind = identifyProduct(file) ?? 'unknown';
    try {
      if (a.kind === 'rmf') a.rmf = readRmf(file).data;
      if (a.kind === 'arf') a.arf = readArf(file).data;
    } catch (e) {
      if (!isInputError(e)) throw e;
      // The checks below report what is wrong; nothing to plot.
    }
  } catch (e) {
    a.error = errText(e);
    return a;
  }
  try {
    const r = checkFile(bytes, fileName, { product: fileName });
    a.checks = r.checks;
    if (a.kind === 'unknown') a.kind = r.kind;
  } catch (e) {
    a.error = errText(e);
  }
  return a;
}

/** Row i of an RMF as a full channel vector (groups expanded). */
export function rmfRow(d: RmfData, i: number): Float64Array {
  const out = new Float64Array(d.detchans);
  const row = d.rows[i];
  let k = 0;
  for (let g = 0; g < row.fChan.length; g++)
    for (let c = 0; c < row.nChan[g]; c++) {
      const ch = row.fChan[g] + c - d.firstChannel;
      if (ch >= 0 && ch < d.detchans) out[ch] = row.matrix[k];
      k++;
    }
  return out;
}

/** Index of the energy bin containing eKeV (nearest when outside). */
export function binOf(lo: ArrayLike<number>, hi: ArrayLike<number>, eKeV: number): number {
  let best = 0;
  for (let i = 0; i < lo.length; i++) {
    if (eKeV >= lo[i] && eKeV < hi[i]) return i;
    if (Math.abs((lo[i] + hi[i]) / 2 - eKeV) < Math.abs((lo[best] + hi[best]) / 2 - eKeV)) best = i;
  }
  return best;
}

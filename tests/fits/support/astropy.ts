/**
 * What astropy.io.fits (Debian python3-astropy, the reference reader) makes of a FITS file:
 * verify('exception'), checksum flags, warnings, header values and column values as JSON.
 */
import { runPythonJson } from '../../support/python.ts';

export interface AstropyHdu {
  name: string;
  checksumValid: number | null;
  datasumValid: number | null;
  /** Checksums astropy computes itself for the bytes as read. */
  computedDatasum: string | null;
  computedChecksum: string | null;
  header: Record<string, unknown>;
  columns: Record<string, { format: string; unit: string | null; values: unknown[] }>;
}
export interface AstropyView {
  hdus: AstropyHdu[];
  warnings: string[];
  verifyError: string | null;
}

const CODE = String.raw`
import json, sys, warnings
import numpy as np
from astropy.io import fits
path = json.load(sys.stdin)
def plain(v):
    if isinstance(v, np.ndarray):
        return [plain(x) for x in v.tolist()] if v.dtype.kind != 'i' or v.dtype.itemsize < 8 else [str(x) for x in v.tolist()]
    if isinstance(v, (np.integer,)):
        return str(int(v)) if v.dtype.itemsize == 8 else int(v)
    if isinstance(v, (np.floating,)):
        return float(v)
    if isinstance(v, (np.bool_,)):
        return bool(v)
    if isinstance(v, bytes):
        return v.decode('ascii')
    if isinstance(v, list):
        return [plain(x) for x in v]
    return v
out = {'hdus': [], 'warnings': [], 'verifyError': None}
with warnings.catch_warnings(record=True) as caught:
    warnings.simplefilter('always')
    with fits.open(path, checksum=True) as hl:
        try:
            hl.verify('exception')
        except Exception as e:
            out['verifyError'] = str(e)
        for h in hl:
            d = {'name': h.name, 'checksumValid': getattr(h, '_checksum_valid', None),
                 'datasumValid': getattr(h, '_datasum_valid', None),
                 'computedDatasum': None, 'computedChecksum': None,
                 'header': {k: h.header[k] for k in h.header if k not in ('COMMENT', 'HISTORY', '')},
                 'columns': {}}
            ds = h._calculate_datasum()
            d['computedDatasum'] = str(ds)
            d['computedChecksum'] = h._calculate_checksum(ds)
            if isinstance(h, fits.BinTableHDU):
                for c in h.columns:
                    col = h.data[c.name]
                    vals = [plain(x) for x in col] if col.dtype == object or getattr(col, 'ndim', 1) > 1 else plain(np.asarray(col))
                    if c.format.endswith('L') and not str(c.format).startswith(('P', '1P')):
                        vals = [bool(x) for x in np.asarray(col).ravel()] if np.asarray(col).ndim == 1 else vals
                    d['columns'][c.name] = {'format': str(c.format), 'unit': c.unit, 'values': vals}
            out['hdus'].append(d)
    # Only warnings about the file itself count (astropy's own deprecations are not the file's fault).
    out['warnings'] = [str(w.message) for w in caught if issubclass(w.category, (UserWarning,)) and 'fits' in w.filename.replace('\\', '/')]
print(json.dumps(out, default=str))
`;

export function astropyView(path: string): AstropyView {
  return runPythonJson<AstropyView>('astropy', CODE, path);
}

/** Runs astropy code with `input` on stdin as JSON (bound to the name `arg`), returning its JSON output. */
export function astropyRun<T>(body: string, input: unknown): T {
  return runPythonJson<T>('astropy', `import json, sys\nimport numpy as np\nfrom astropy.io import fits\narg = json.load(sys.stdin)\n${body}`, input);
}

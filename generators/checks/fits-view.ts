/** Adapter: a parsed FitsFile (generators/fits) → the minimal FileView the structural checks read. */
import type { FitsFile, FitsHdu } from '../fits/index.ts';
import type { ColumnView, FileView, HduView, HeaderLookup } from './types.ts';

function lookup(h: FitsHdu['header']): HeaderLookup {
  return {
    has: (k) => h.has(k),
    get: (k) => {
      const v = h.get(k);
      if (v === undefined || v === null) return undefined;
      if (typeof v === 'bigint') return Number(v);
      return v;
    },
  };
}

export function hduView(h: FitsHdu): HduView {
  const columns: ColumnView[] = (h.table?.columns ?? []).map((c) => ({
    name: c.name,
    form: c.tform,
    unit: c.unit,
    tlmin: c.tlmin,
    tlmax: c.tlmax,
  }));
  return {
    index: h.index,
    name: h.index === 0 && h.name === 'PRIMARY' ? '' : h.name,
    header: lookup(h.header),
    columns,
    rows: h.table?.nRows ?? 0,
    sums: h.checksum,
  };
}

export function fileView(file: FitsFile, fileName: string): FileView {
  return { fileName, hdus: file.hdus.map(hduView) };
}

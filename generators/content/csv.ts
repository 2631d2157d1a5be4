/**
 * Strict CSV with units in the header (RFC 4180 quoting, no multi-line fields). Each column is
 * declared as a base name plus unit: `fwhm_eV` is base "fwhm", unit "eV"; dimensionless columns
 * have no unit suffix. Columns may come in any order; a known base with another unit is an error
 * naming the column and the expected unit (Kiln never guesses a conversion). Lines starting with
 * "#" are comments; blank lines are skipped. Errors name file, line, column, value and expectation.
 * Pure.
 */
import { KilnInputError } from '../errors.ts';

export interface CsvColumn {
  /** Key of the parsed row, e.g. "fwhmEv". */
  key: string;
  /** Base name in the header, e.g. "fwhm". */
  name: string;
  /** Unit suffix, e.g. "eV"; null for dimensionless or text columns. */
  unit: string | null;
  type: 'number' | 'text';
  /** An empty cell is allowed and reads as null. */
  nullable?: boolean;
  /** The column may be left out of the header (its key is then absent from every row). */
  optional?: boolean;
}

export interface CsvRow {
  /** 1-based line in the file. */
  line: number;
  values: Record<string, number | string | null>;
  /** 1-based character column of each cell, by key. */
  columnOf: Record<string, number>;
}

export interface CsvTable {
  file: string;
  headerLine: number;
  rows: CsvRow[];
}

/** Decimal numbers only: no hex, no "nan"/"inf", no thousands separators. */
const NUMBER_RE = /^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/;

export const headerName = (c: CsvColumn): string => (c.unit ? `${c.name}_${c.unit}` : c.name);

interface Cell {
  text: string;
  column: number;
}

/** Splits one line into cells (trims unquoted cells). */
function splitLine(s: string, file: string, line: number): Cell[] {
  const cells: Cell[] = [];
  let i = 0;
  for (;;) {
    while (s[i] === ' ' || s[i] === '\t') i++;
    const column = i + 1;
    if (s[i] === '"') {
      let out = '';
      i++;
      for (;;) {
        if (i >= s.length) throw new KilnInputError('unterminated quoted field', { file, line, field: `column ${column}`, expected: 'a closing double quote on the same line' });
        if (s[i] === '"') {
          if (s[i + 1] === '"') {
            out += '"';
            i += 2;
            continue;
          }
          i++;
          break;
        }
        out += s[i++];
      }
      while (s[i] === ' ' || s[i] === '\t') i++;
      if (i < s.length && s[i] !== ',')
        throw new KilnInputError('text after a quoted field', { file, line, field: `column ${i + 1}`, value: s.slice(i, i + 10), expected: 'a comma or the end of the line' });
      cells.push({ text: out, column });
    } else {
      const end = s.indexOf(',', i);
      const raw = end < 0 ? s.slice(i) : s.slice(i, end);
      if (raw.includes('"'))
        throw new KilnInputError('stray double quote in an unquoted field', { file, line, field: `column ${column}`, value: raw, expected: 'quotes only around a whole field' });
      cells.push({ text: raw.trim(), column });
      i = end < 0 ? s.length : end;
    }
    if (i >= s.length) return cells;
    i++; // the comma
  }
}

/** Maps a header cell to a declared column: the longest base name that prefixes it. */
function matchHeader(h: string, columns: readonly CsvColumn[]): { col: CsvColumn; unit: string | null } | null {
  let best: { col: CsvColumn; unit: string | null } | null = null;
  for (const col of columns) {
    if (h === col.name) {
      if (!best || col.name.length > best.col.name.length) best = { col, unit: null };
    } else if (h.startsWith(col.name + '_')) {
      if (!best || col.name.length > best.col.name.length) best = { col, unit: h.slice(col.name.length + 1) };
    }
  }
  return best;
}

export function parseCsv(text: string, file: string, columns: readonly CsvColumn[]): CsvTable {
  const lines = text.replace(/^\uFEFF/, '').split(/\r?\n/);
  const expectedHeader = columns.map((c) => (c.optional ? `[${headerName(c)}]` : headerName(c))).join(',');
  let headerLine = 0;
  let order: CsvColumn[] | null = null;
  const rows: CsvRow[] = [];
  lines.forEach((s, idx) => {
    const line = idx + 1;
    if (s.trim() === '' || s.trimStart().startsWith('#')) return;
    const cells = splitLine(s, file, line);
    if (!order) {
      headerLine = line;
      order = [];
      const seen = new Set<string>();
      for (const c of cells) {
        const m = matchHeader(c.text, columns);
        if (!m)
          throw new KilnInputError(`unknown column "${c.text}"`, { file, line, field: `column ${c.column}`, value: c.text, expected: `the header ${expectedHeader}` });
        if (m.unit !== m.col.unit)
          throw new KilnInputError(
            m.col.unit
              ? `column "${c.text}" has unit ${m.unit ?? '(none)'}; Kiln reads ${m.col.name} in ${m.col.unit} only (convert the values and rename the column)`
              : `column "${c.text}" is dimensionless and takes no unit suffix`,
            { file, line, field: `column ${c.column}`, value: c.text, expected: headerName(m.col) },
          );
        if (seen.has(m.col.key)) throw new KilnInputError(`column "${c.text}" appears twice`, { file, line, field: `column ${c.column}`, value: c.text, expected: 'each column once' });
        seen.add(m.col.key);
        order.push(m.col);
      }
      const missing = columns.filter((c) => !seen.has(c.key) && !c.optional).map(headerName);
      if (missing.length)
        throw new KilnInputError(`missing column${missing.length > 1 ? 's' : ''} ${missing.join(', ')}`, { file, line, field: 'header', value: s, expected: `the header ${expectedHeader}` });
      return;
    }
    if (cells.length !== order.length)
      throw new KilnInputError(`row has ${cells.length} fields, the header ${order.length}`, { file, line, value: s, expected: `${order.length} comma-separated fields` });
    const values: CsvRow['values'] = {};
    const columnOf: CsvRow['columnOf'] = {};
    cells.forEach((c, j) => {
      const col = order![j];
      columnOf[col.key] = c.column;
      const where = { file, line, field: `${headerName(col)} (column ${c.column})`, value: c.text };
      if (c.text === '') {
        if (!col.nullable) throw new KilnInputError('empty field', { ...where, expected: col.type === 'number' ? 'a number' : 'a non-empty text' });
        values[col.key] = null;
      } else if (col.type === 'number') {
        if (!NUMBER_RE.test(c.text)) throw new KilnInputError('not a number', { ...where, expected: `a decimal number${col.unit ? ` in ${col.unit}` : ''}` });
        values[col.key] = Number(c.text);
      } else values[col.key] = c.text;
    });
    rows.push({ line, values, columnOf });
  });
  if (!order) throw new KilnInputError('no header line', { file, line: 1, expected: `the header ${expectedHeader}` });
  return { file, headerLine, rows };
}
